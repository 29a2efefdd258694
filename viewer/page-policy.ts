// The page's Content-Security-Policy, written once for the two ways it reaches a browser
// (docs/viewer.md, "Serving the page"):
//   - in the built index.html, as <meta http-equiv="Content-Security-Policy"> (vite.config.ts puts
//     it first in <head>, before any script), so that any static host serves the page under it;
//   - as a header from `vite preview` and the dev server, which also carries what a meta tag
//     cannot: frame-ancestors (and report-uri, sandbox) are ignored in a meta tag by the standard.
// Nothing inline, every script and worker from the page's own origin, WebAssembly compiled from
// our embedded kernel. 'unsafe-eval' is there for one reason only: regl builds its draw commands
// with Function at run time (node_modules/regl/dist/regl.js, the Function.apply in its code
// generator); test/browser/csp.test.ts proves that nothing else in the page or the engine needs
// it, and our own code never evaluates text (test/browser/no-code-generation.test.ts).

/** Directive and value, in the order they are written. */
const DIRECTIVES: ReadonlyArray<readonly [string, string]> = [
  ['default-src', "'self'"],
  ['script-src', "'self' 'wasm-unsafe-eval' 'unsafe-eval'"],
  ['worker-src', "'self'"],
  ['style-src', "'self'"],
  ['img-src', "'self' blob:"],
  ['object-src', "'none'"],
  ['base-uri', "'none'"],
  ['form-action', "'none'"],
  ['frame-ancestors', "'none'"],
];

/** Directives a <meta> policy may not carry (the CSP standard has browsers ignore them there). */
export const HEADER_ONLY_DIRECTIVES: ReadonlySet<string> = new Set(['frame-ancestors', 'report-uri', 'sandbox']);

const text = (list: ReadonlyArray<readonly [string, string]>) => list.map(([d, v]) => `${d} ${v}`).join('; ');

/** The whole policy, as a header. */
export const pagePolicy = text(DIRECTIVES);

/** Everything a meta tag can carry: the policy without its header-only directives. */
export const metaPolicy = text(DIRECTIVES.filter(([d]) => !HEADER_ONLY_DIRECTIVES.has(d)));

/**
 * The dev server injects its CSS as <style> elements and talks to the page over a WebSocket
 * ('self' covers ws: on the same host), so it needs inline styles; nothing else changes. The dev
 * page gets no meta tag (it would take the inline styles away again).
 */
export const devPolicy = pagePolicy.replace("style-src 'self'", "style-src 'self' 'unsafe-inline'");
