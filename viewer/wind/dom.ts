// The wind panel's small DOM helpers.

export function $new<K extends keyof HTMLElementTagNameMap>(
  tag: K,
  props: Record<string, unknown> = {},
  ...children: Array<Node | string>
): HTMLElementTagNameMap[K] {
  const el = document.createElement(tag);
  Object.assign(el, props);
  el.append(...children);
  return el;
}

export function button(text: string, id: string, title = ''): HTMLButtonElement {
  return $new('button', { type: 'button', id, textContent: text, title });
}

/** A labelled text box for a number ("label [box] units"), and the box. */
export function numberBox(
  id: string,
  value: string,
  label: string,
  units: string,
  size = 5,
): [HTMLLabelElement, HTMLInputElement] {
  const input = $new('input', { id, type: 'text', value, size, autocomplete: 'off' });
  input.inputMode = 'decimal';
  return [$new('label', {}, `${label} `, input, ` ${units}`), input];
}
