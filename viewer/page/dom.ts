// The page shell's small DOM helpers: elements by id, and writes that skip when nothing changed
// (a redraw without news then touches no text and starts no layout).

export const $ = <T extends HTMLElement>(id: string): T => document.getElementById(id) as T;

export function setText(id: string, text: string): void {
  const el = $(id);
  if (el.textContent !== text) el.textContent = text;
}

export function setValue(id: string, value: string): void {
  const el = $<HTMLInputElement>(id);
  if (el.value !== value) el.value = value;
}

/** The value of the checked radio button of a group, or `fallback`. */
export function checkedValue(name: string, fallback: string): string {
  return document.querySelector<HTMLInputElement>(`input[name="${name}"]:checked`)?.value ?? fallback;
}
