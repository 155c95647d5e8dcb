import { defineConfig } from 'vitest/config';

/*
 * Only the keying engine's own tests, for mutation testing (`npm run test:mutation`):
 * Stryker runs this config against each mutant of shared/keying. fast-check runs with a
 * fixed seed here so a mutant is killed or survives the same way on every run.
 */
export default defineConfig({
  test: {
    include: ['shared/keying/**/*.test.ts'],
    environment: 'node',
    setupFiles: ['shared/keying/testing/fixedSeed.ts'],
    testTimeout: 60_000,
  },
});
