import { defineConfig } from 'vitest/config';

// Tests run from the project root (vite.config.ts roots the page in viewer/).
export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    testTimeout: 180_000,
    hookTimeout: 180_000,
  },
});
