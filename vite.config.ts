import { fileURLToPath } from 'node:url';
import { defineConfig, type Plugin } from 'vite';
import { helpPlugin } from './viewer/help/docs-plugin.ts';
import { devPolicy, metaPolicy, pagePolicy } from './viewer/page-policy.ts';

// Cross-origin isolation lets the engine share buffers with the page when it wants to.
const isolation = {
  'Cross-Origin-Opener-Policy': 'same-origin',
  'Cross-Origin-Embedder-Policy': 'require-corp',
};

// The Content-Security-Policy has one source, viewer/page-policy.ts: the built page carries it in
// a meta tag (everything a meta tag can carry), the preview and dev servers send it as a header
// (with frame-ancestors, which only a header can carry). docs/reliability.md and docs/viewer.md.
export { pagePolicy };

/** The policy as the first element of the built page's <head>, before any script or style. */
const policyInPage: Plugin = {
  name: 'pycno-page-policy',
  apply: 'build',
  transformIndexHtml: () => [
    { tag: 'meta', attrs: { 'http-equiv': 'Content-Security-Policy', content: metaPolicy }, injectTo: 'head-prepend' },
  ],
};

export default defineConfig({
  root: 'viewer',
  // The docs as in-page help, rendered at build time (viewer/help/docs-plugin.ts).
  plugins: [helpPlugin(fileURLToPath(new URL('./docs', import.meta.url))), policyInPage],
  publicDir: false,
  build: { outDir: '../dist/viewer', emptyOutDir: true },
  worker: { format: 'es' },
  optimizeDeps: { include: ['comlink', 'seedrandom', 'regl'] },
  server: { headers: { ...isolation, 'Content-Security-Policy': devPolicy } },
  preview: { headers: { ...isolation, 'Content-Security-Policy': pagePolicy } },
});
