// Help in the page: the docs (rendered when the page was built) in a panel over the right side,
// opened by the Help button or by any link "#help:FILE.md#section" anywhere on the page (the
// formula box's hint is one). The HTML is our own docs, rendered by markdown-it without raw HTML.

import pages from 'virtual:pycno-help';
import { $ } from './dom.ts';

export interface Help {
  open(file?: string, anchor?: string): void;
  close(): void;
}

export function wireHelp(): Help {
  const panel = $('help-panel');
  const body = $('help-body');
  const nav = $('help-nav');
  const button = $<HTMLButtonElement>('btn-help');
  let current = '';
  const buttons = pages.map((p) => {
    const b = document.createElement('button');
    b.type = 'button';
    b.className = 'small-button';
    b.textContent = p.title.replace(/^Pycno:?\s*/i, '');
    b.dataset.file = p.file;
    b.addEventListener('click', () => help.open(p.file));
    return b;
  });
  nav.replaceChildren(...buttons);
  const help: Help = {
    open(file = current || pages[0]?.file, anchor) {
      const page = pages.find((p) => p.file === file) ?? pages[0];
      if (!page) return;
      if (page.file !== current) {
        // Our docs, rendered at build time without raw HTML (viewer/help/docs-plugin.ts).
        body.innerHTML = page.html;
        current = page.file;
        body.dataset.file = page.file;
      }
      for (const b of buttons) b.toggleAttribute('aria-current', false);
      buttons.find((b) => b.dataset.file === page.file)?.setAttribute('aria-current', 'page');
      panel.hidden = false;
      button.setAttribute('aria-expanded', 'true');
      const target = anchor ? body.querySelector(`[id="${CSS.escape(anchor)}"]`) : null;
      if (target) target.scrollIntoView({ block: 'start' });
      else body.scrollTop = 0;
    },
    close() {
      panel.hidden = true;
      button.setAttribute('aria-expanded', 'false');
    },
  };
  button.addEventListener('click', () => (panel.hidden ? help.open() : help.close()));
  $('btn-help-close').addEventListener('click', () => help.close());
  document.addEventListener('keydown', (ev) => {
    if (ev.key === 'Escape' && !panel.hidden) help.close();
  });
  // Every help link of the page, in the docs or elsewhere (the formula hint).
  document.addEventListener('click', (ev) => {
    const a = (ev.target as Element | null)?.closest?.('a');
    if (!a) return;
    const href = a.getAttribute('href') ?? '';
    const m = /^#help:([^#]+)(?:#(.*))?$/.exec(href);
    if (m) {
      ev.preventDefault();
      help.open(m[1], m[2]);
    } else if (a.hasAttribute('data-repo-file')) ev.preventDefault();
  });
  return help;
}
