// The wind panel's list of parts: one line each with its switch, name, summary and the buttons that
// move, copy and delete it. Clicks become list edits of the design (design-state.ts).

import type { WindPart } from '../../model/forcing/spec.ts';
import { PATTERN_LABELS, patternOf, summary } from './design.ts';
import type { DesignState, ListEdit } from './design-state.ts';
import { $new } from './dom.ts';

export interface PartsListActions {
  edit(e: ListEdit): void;
  select(index: number, part: WindPart): void;
}

const title = (part: WindPart, k: number) => `${k + 1}. ${part.name || PATTERN_LABELS[patternOf(part)]}`;

export function renderPartsList(list: HTMLElement, design: DesignState, act: PartsListActions): void {
  const { wind, selected } = design;
  const items = wind.parts.map((part, k) => {
    const li = $new('li', {
      className: `wd-part${k === selected ? ' selected' : ''}${part.enabled === false ? ' off' : ''}`,
    });
    li.dataset.index = String(k);
    const on = $new('input', {
      type: 'checkbox',
      checked: part.enabled !== false,
      title: 'On or off (off leaves it out of the run)',
    });
    on.setAttribute('aria-label', `part ${k + 1} on`);
    on.addEventListener('change', () => act.edit({ kind: 'enable', index: k, on: on.checked }));
    const pick = $new('button', { type: 'button', className: 'wd-pick', textContent: title(part, k) });
    pick.setAttribute('aria-pressed', String(k === selected));
    pick.addEventListener('click', () => act.select(k, part));
    const sum = $new('span', { className: 'wd-summary', textContent: summary(part) });
    const up = $new('button', { type: 'button', textContent: '↑', title: 'Move up', disabled: k === 0 });
    up.setAttribute('aria-label', `move part ${k + 1} up`);
    up.addEventListener('click', () => act.edit({ kind: 'move', index: k, by: -1 }));
    const down = $new('button', {
      type: 'button',
      textContent: '↓',
      title: 'Move down',
      disabled: k === wind.parts.length - 1,
    });
    down.setAttribute('aria-label', `move part ${k + 1} down`);
    down.addEventListener('click', () => act.edit({ kind: 'move', index: k, by: 1 }));
    const dup = $new('button', { type: 'button', textContent: 'Duplicate' });
    dup.addEventListener('click', () => act.edit({ kind: 'duplicate', index: k }));
    const del = $new('button', { type: 'button', textContent: 'Delete', title: 'Delete (undo brings it back)' });
    del.addEventListener('click', () => act.edit({ kind: 'delete', index: k }));
    li.append($new('div', { className: 'row small' }, on, pick, up, down, dup, del), sum);
    return li;
  });
  list.replaceChildren(...items);
  if (!items.length)
    list.replaceChildren(
      $new('li', { className: 'hint', textContent: 'No wind: the ocean stays at rest. Add a part above.' }),
    );
}

/** Only the texts changed (typing in the editor): update them without rebuilding the list. */
export function updatePartSummaries(list: HTMLElement, design: DesignState): void {
  list.querySelectorAll<HTMLElement>('li.wd-part').forEach((li) => {
    const k = Number(li.dataset.index);
    const part = design.wind.parts[k];
    if (!part) return;
    li.querySelector('.wd-summary')!.textContent = summary(part);
    li.querySelector('.wd-pick')!.textContent = title(part, k);
  });
}

/** The map tool that shapes a part of this pattern, if any. */
export function toolFor(part: WindPart): 'patch' | 'band' | 'paint' | null {
  const p = patternOf(part);
  return p === 'patch' ? 'patch' : p === 'band' ? 'band' : p === 'painted' ? 'paint' : null;
}
