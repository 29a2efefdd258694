import { defineConfig } from 'vitest/config';

// Tests run from the project root (vite.config.ts roots the page in viewer/). Two projects: every
// test as it is, and the physics checks once more in float32 (test/support/physics-kit.ts, PRECISION).
export default defineConfig({
  test: {
    testTimeout: 180_000,
    hookTimeout: 180_000,
    projects: [
      { extends: true, test: { name: 'all', include: ['test/**/*.test.ts'] } },
      {
        extends: true,
        test: { name: 'physics-float32', include: ['test/physics/**/*.test.ts'], env: { PYCNO_PRECISION: 'float32' } },
      },
    ],
  },
});
