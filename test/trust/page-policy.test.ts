// The page's security policy travels with the page (issue 20). It used to be sent only as a
// header by `vite preview`, so a static host served the built index.html with no policy at all.
// Now the built page carries it in a <meta http-equiv="Content-Security-Policy"> before any
// script (everything a meta tag can carry), and the servers add the header for what only a
// header can carry (frame-ancestors). One source for both: viewer/page-policy.ts. This test
// builds the page and reads the built files; in Chromium it serves them from a plain static
// server that sends no policy header, and checks that the meta policy is the one in force.

import { createServer, type Server } from 'node:http';
import { mkdtempSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { extname, join, normalize } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build } from 'vite';
import viteConfig, { pagePolicy as servedPolicy } from '../../vite.config.ts';
import { devPolicy, HEADER_ONLY_DIRECTIVES, metaPolicy, pagePolicy } from '../../viewer/page-policy.ts';
import { chromiumMissing, launch, ROOT } from '../support/browser-harness.ts';

let outDir: string;
let html: string;

beforeAll(async () => {
  outDir = mkdtempSync(join(tmpdir(), 'pycno-policy-'));
  await build({
    root: join(ROOT, 'viewer'),
    configFile: join(ROOT, 'vite.config.ts'),
    logLevel: 'error',
    build: { outDir, emptyOutDir: true },
  });
  html = readFileSync(join(outDir, 'index.html'), 'utf8');
}, 120_000);
afterAll(() => rmSync(outDir, { recursive: true, force: true }));

/** The directives of a policy text, by name. */
function directives(policy: string): Map<string, string> {
  return new Map(
    policy
      .split(';')
      .map((d) => d.trim())
      .filter(Boolean)
      .map((d) => [d.split(/\s+/)[0], d.slice(d.indexOf(' ') + 1)] as [string, string]),
  );
}

/** The meta policies of an HTML text, attribute entities decoded. */
function metaPolicies(text: string): string[] {
  return [...text.matchAll(/<meta\s+http-equiv="Content-Security-Policy"\s+content="([^"]*)"\s*\/?>/gi)].map((m) =>
    m[1]
      .replace(/&#39;/g, "'")
      .replace(/&quot;/g, '"')
      .replace(/&amp;/g, '&'),
  );
}

describe('the built page carries its policy', () => {
  it('index.html has one policy meta tag, the meta policy of viewer/page-policy.ts, first in <head>, before every script and style', () => {
    expect(metaPolicies(html)).toEqual([metaPolicy]);
    const head = html.slice(html.indexOf('<head>'), html.indexOf('</head>'));
    const meta = head.indexOf('http-equiv="Content-Security-Policy"');
    expect(meta).toBeGreaterThan(0);
    for (const later of ['<script', '<link', '<style']) {
      const at = head.indexOf(later);
      if (at >= 0) expect(at, later).toBeGreaterThan(meta);
    }
    // The character set must still be declared within the first 1024 bytes.
    expect(Buffer.from(html).subarray(0, 1024).toString()).toContain('<meta charset="utf-8"');
    // No inline script or style for the policy to allow.
    expect(html).not.toMatch(/<script(?![^>]*\ssrc=)[^>]*>/);
    expect(html).not.toMatch(/<style|\sstyle="/);
  });

  it("the meta tag carries every directive a meta tag may carry, with the header's values; frame-ancestors only in the header", () => {
    const meta = directives(metaPolicy);
    const header = directives(pagePolicy);
    for (const [d, v] of header) {
      if (HEADER_ONLY_DIRECTIVES.has(d)) expect(meta.has(d), d).toBe(false);
      else expect(meta.get(d), d).toBe(v);
    }
    expect(header.get('frame-ancestors')).toBe("'none'");
    expect([...meta.keys()]).toEqual([
      'default-src',
      'script-src',
      'worker-src',
      'style-src',
      'img-src',
      'object-src',
      'base-uri',
      'form-action',
    ]);
  });

  it("regl's 'unsafe-eval' is in both, as settled (docs/reliability.md); nothing inline is allowed", () => {
    for (const p of [metaPolicy, pagePolicy]) {
      expect(directives(p).get('script-src')).toBe("'self' 'wasm-unsafe-eval' 'unsafe-eval'");
      expect(p).not.toMatch(/unsafe-inline|\*|http:|https:|data:/);
    }
  });

  it('the preview server sends the whole policy as a header, the dev server the same with inline styles for its injected CSS', () => {
    expect(servedPolicy).toBe(pagePolicy);
    const config = viteConfig as {
      preview?: { headers?: Record<string, string> };
      server?: { headers?: Record<string, string> };
    };
    expect(config.preview?.headers?.['Content-Security-Policy']).toBe(pagePolicy);
    expect(config.server?.headers?.['Content-Security-Policy']).toBe(devPolicy);
    expect(devPolicy).toBe(pagePolicy.replace("style-src 'self'", "style-src 'self' 'unsafe-inline'"));
  });
});

const missing = chromiumMissing();

describe.skipIf(missing !== null)(
  'on a static host that sends no policy header, the meta policy is in force (Chromium)',
  () => {
    let server: Server;
    let url: string;
    const types: Record<string, string> = {
      '.html': 'text/html',
      '.js': 'text/javascript',
      '.css': 'text/css',
      '.wasm': 'application/wasm',
      '.json': 'application/json',
      '.map': 'application/json',
    };

    beforeAll(async () => {
      server = createServer((req, res) => {
        const path = normalize(decodeURIComponent((req.url ?? '/').split('?')[0])).replace(/^(\.\.[/\\])+/, '');
        const file = join(outDir, path === '/' ? 'index.html' : path);
        try {
          const body = readFileSync(file);
          res.writeHead(200, { 'Content-Type': types[extname(file)] ?? 'application/octet-stream' });
          res.end(body);
        } catch {
          res.writeHead(404);
          res.end();
        }
      });
      await new Promise<void>((r) => server.listen(0, '127.0.0.1', () => r()));
      url = `http://127.0.0.1:${(server.address() as { port: number }).port}/`;
    });
    afterAll(() => new Promise<void>((r) => server.close(() => r())));

    it('an inline script added to the page is refused by the policy of the meta tag, and no header policy exists', async () => {
      const res = await fetch(url);
      expect(res.headers.get('content-security-policy')).toBeNull();
      expect(readdirSync(join(outDir, 'assets')).some((f) => f.endsWith('.js'))).toBe(true);
      const browser = await launch();
      try {
        const page = await browser.newPage();
        await page.goto(url);
        const seen = await page.evaluate(
          () =>
            new Promise<{ ran: boolean; directive: string; policy: string; disposition: string }>((resolve) => {
              document.addEventListener('securitypolicyviolation', (e) =>
                resolve({
                  ran: (window as unknown as { __inline?: number }).__inline === 1,
                  directive: e.effectiveDirective,
                  policy: e.originalPolicy,
                  disposition: e.disposition,
                }),
              );
              const s = document.createElement('script');
              s.textContent = 'window.__inline = 1';
              document.head.append(s);
              setTimeout(
                () =>
                  resolve({
                    ran: (window as unknown as { __inline?: number }).__inline === 1,
                    directive: 'none',
                    policy: '',
                    disposition: '',
                  }),
                3000,
              );
            }),
        );
        expect(seen.ran).toBe(false);
        expect(seen.directive).toBe('script-src-elem');
        expect(seen.policy).toBe(metaPolicy);
        expect(seen.disposition).toBe('enforce');
      } finally {
        await browser.close();
      }
    });
  },
);
