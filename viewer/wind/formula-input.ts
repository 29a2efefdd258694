// The formula box: checked on every keystroke by the model's own compiler. A mistake is shown
// with a caret under the character it was found at, and the formula is only handed to the design
// once it compiles, so a half-typed formula never breaks the preview (the last good one stays).

import { caretLines, checkFormula } from './formula-check.ts';

export function formulaInput(
  initial: string,
  basin: { lonWest: number; lonEast: number; latSouth: number; latNorth: number },
  quantityUnits: string,
  onGood: (text: string) => void,
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
  hint.append(`lon in °E, lat in °N, t in days; the value is a dimensionless factor (about -1 to 1) that x and y (${quantityUnits}) scale. The functions: `, link, '.');
  const check = (fromUser: boolean) => {
    const r = checkFormula(box.value, basin);
    wrap.classList.toggle('invalid', !r.ok);
    box.setAttribute('aria-invalid', String(!r.ok));
    if (!r.ok) {
      if (r.index >= 0) {
        const [a, b] = caretLines(box.value, r.index);
        caret.textContent = `${a}\n${b}\n${r.message}`;
      } else caret.textContent = r.message;
      return;
    }
    const range = `over the basin at day 0 it runs from ${Number(r.min.toPrecision(3))} to ${Number(r.max.toPrecision(3))}${r.usesTime ? '; it changes with t' : ''}`;
    caret.textContent = r.badAt ? `compiles, but ${r.badAt}: the run would stop there` : range;
    // A formula that gives NaN somewhere still goes to the design: the validator and the preview
    // then say where, and the user sees it at once.
    if (fromUser) onGood(box.value);
  };
  box.addEventListener('input', () => check(true));
  wrap.append(label, box, caret, hint);
  check(false);
  return wrap;
}
