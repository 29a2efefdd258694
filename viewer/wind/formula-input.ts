// The formula box: checked on every keystroke by the model's own compiler. What the box shows is
// what the design holds (and what Apply would run): a formula that does not compile is kept as
// typed, marked invalid with a caret under the character at fault, and the wind panel keeps Apply
// off until it compiles (it checks the forcing the engine would build, wind-panel.ts).

import { caretLines, checkFormula } from './formula-check.ts';

export function formulaInput(
  initial: string,
  basin: { lonWest: number; lonEast: number; latSouth: number; latNorth: number },
  quantityUnits: string,
  onChange: (text: string) => void,
  idBase: string,
): HTMLElement {
  const wrap = document.createElement('div');
  wrap.className = 'wd-formula';
  const label = document.createElement('label');
  label.textContent = 'Shape formula f(lon, lat, t)';
  label.htmlFor = `${idBase}-formula`;
  const box = document.createElement('textarea');
  box.id = `${idBase}-formula`;
  box.rows = 2;
  box.spellcheck = false;
  box.value = initial;
  box.className = 'wd-formula-box';
  const caret = document.createElement('pre');
  caret.className = 'wd-caret';
  caret.id = `${idBase}-formula-msg`;
  caret.setAttribute('aria-live', 'polite');
  box.setAttribute('aria-describedby', caret.id);
  const hint = document.createElement('div');
  hint.className = 'hint';
  const link = document.createElement('a');
  link.href = '#help:wind.md#the-formula-language';
  link.textContent = 'the formula language in Help';
  hint.append(
    `lon in °E, lat in °N, t in days; the value is a dimensionless factor (about -1 to 1) that x and y (${quantityUnits}) scale. The functions: `,
    link,
    '.',
  );
  const check = (fromUser: boolean) => {
    const r = checkFormula(box.value, basin);
    wrap.classList.toggle('invalid', !r.ok);
    box.setAttribute('aria-invalid', String(!r.ok));
    if (!r.ok) {
      if (r.index >= 0) {
        const [a, b] = caretLines(box.value, r.index);
        caret.textContent = `${a}\n${b}\n${r.message}`;
      } else caret.textContent = r.message;
      caret.textContent += '\nNot runnable: Apply and run stays off until the formula compiles.';
      if (fromUser) onChange(box.value);
      return;
    }
    const range = `over the basin at day 0 it runs from ${Number(r.min.toPrecision(3))} to ${Number(r.max.toPrecision(3))}${r.usesTime ? '; it changes with t' : ''}`;
    caret.textContent = r.badAt
      ? `compiles, but ${r.badAt}: the run would stop there (Apply and run stays off)`
      : range;
    if (r.badAt) {
      wrap.classList.add('invalid');
      box.setAttribute('aria-invalid', 'true');
    }
    if (fromUser) onChange(box.value);
  };
  box.addEventListener('input', () => check(true));
  wrap.append(label, box, caret, hint);
  check(false);
  return wrap;
}
