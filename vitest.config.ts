import { resolve } from 'node:path';
import { defineConfig } from 'vitest/config';

export default defineConfig({
  // The same yaml build the bundles use (esbuild.mjs): tests time and check the shipped code.
  resolve: { alias: [{ find: /^yaml$/, replacement: resolve('node_modules/yaml/browser/index.js') }] },
  test: {
    include: ['test/**/*.test.ts'],
    // Says before and after the run when QPOINT_SKIP_WORKBENCH leaves a suite out.
    globalSetup: ['test/skip-notice.ts'],
    testTimeout: 120_000,
    hookTimeout: 300_000,
  },
});
