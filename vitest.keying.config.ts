import { defineConfig } from 'vitest/config';

/*
 * The keying engine's own tests (and the one schema test that checks an engine function), for mutation testing (`npm run test:mutation`):
 * Stryker runs this config against each mutant of shared/keying. fast-check runs with a
 * fixed seed here so a mutant is killed or survives the same way on every run.
 */
export default defineConfig({
  test: {
    // The engine's tests, and the profile schema's, which checks validateProfile at every edge of limits.ts.
    include: ['shared/keying/**/*.test.ts', 'shared/schemas/profiles.test.ts'],
    environment: 'node',
    setupFiles: ['shared/keying/testing/fixedSeed.ts'],
    testTimeout: 60_000,
  },
});
