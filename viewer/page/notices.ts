// The page's messages: dismissable lines above the map, and the no-go box that replaces the page
// when this browser cannot run it at all.

import { $ } from './dom.ts';
import type { PageInfo } from './page-info.ts';

export type NoticeKind = 'error' | 'info';

export class Notices {
  constructor(private readonly info: PageInfo) {}

  message(text: string, kind: NoticeKind = 'error'): void {
    const div = document.createElement('div');
    div.className = `message ${kind}`;
    const span = document.createElement('span');
    span.textContent = text;
    const close = document.createElement('button');
    close.type = 'button';
    close.textContent = 'dismiss';
    close.addEventListener('click', () => div.remove());
    div.append(span, close);
    $('messages').append(div);
    if (kind === 'error') this.info.errors.push(text);
  }

  clear(): void {
    $('messages').replaceChildren();
  }

  /** The page cannot run here: say why instead of showing controls that cannot work. */
  noGo(title: string, detail: string): void {
    $('app').hidden = true;
    $('messages').hidden = true;
    for (const b of document.querySelectorAll<HTMLButtonElement>('.controls button, .controls select'))
      b.disabled = true;
    const box = $('no-go');
    const h = document.createElement('h2');
    h.textContent = title;
    const p = document.createElement('p');
    p.textContent = detail;
    box.replaceChildren(h, p);
    box.hidden = false;
    $('status').textContent = 'cannot run here';
  }
}
