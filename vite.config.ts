import { defineConfig } from 'vite';

// Cross-origin isolation lets the engine share buffers with the page when it wants to.
const isolation = {
  'Cross-Origin-Opener-Policy': 'same-origin',
  'Cross-Origin-Embedder-Policy': 'require-corp',
};

export default defineConfig({
  root: 'viewer',
  publicDir: false,
  build: { outDir: '../dist/viewer', emptyOutDir: true },
  worker: { format: 'es' },
  optimizeDeps: { include: ['comlink', 'seedrandom', 'regl'] },
  server: { headers: isolation },
  preview: { headers: isolation },
});
