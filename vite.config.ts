import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vite';
import { helpPlugin } from './viewer/help/docs-plugin.ts';

// Cross-origin isolation lets the engine share buffers with the page when it wants to.
const isolation = {
  'Cross-Origin-Opener-Policy': 'same-origin',
  'Cross-Origin-Embedder-Policy': 'require-corp',
};

/**
 * The Content-Security-Policy the page is served with (docs/reliability.md). Nothing inline, every
 * script and worker from the page's own origin, WebAssembly compiled from our embedded kernel.
 * 'unsafe-eval' is there for one reason only: regl builds its draw commands with Function at run
 * time (node_modules/regl/dist/regl.js, the Function.apply in its code generator); the browser
 * test test/browser/csp.test.ts proves that nothing else in the page or the engine needs it.
 */
export const pagePolicy = [
  "default-src 'self'",
  "script-src 'self' 'wasm-unsafe-eval' 'unsafe-eval'",
  "worker-src 'self'",
  "style-src 'self'",
  "img-src 'self' blob:",
  "object-src 'none'",
  "base-uri 'none'",
  "form-action 'none'",
  "frame-ancestors 'none'",
].join('; ');

// The dev server injects its CSS as <style> elements and talks to the page over a WebSocket
// ('self' covers ws: on the same host), so it needs inline styles; nothing else changes.
const devPolicy = pagePolicy.replace("style-src 'self'", "style-src 'self' 'unsafe-inline'");

export default defineConfig({
  root: 'viewer',
  // The docs as in-page help, rendered at build time (viewer/help/docs-plugin.ts).
  plugins: [helpPlugin(fileURLToPath(new URL('./docs', import.meta.url)))],
  publicDir: false,
  build: { outDir: '../dist/viewer', emptyOutDir: true },
  worker: { format: 'es' },
  optimizeDeps: { include: ['comlink', 'seedrandom', 'regl'] },
  server: { headers: { ...isolation, 'Content-Security-Policy': devPolicy } },
  preview: { headers: { ...isolation, 'Content-Security-Policy': pagePolicy } },
});
