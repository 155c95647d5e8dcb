/**
 * Test-only setup for the mutation run (vitest.keying.config.ts): one fast-check seed, so
 * a mutant is killed or survives the same way on every run, and fewer runs per property
 * (see `runs` in arbitraries.ts).
 */
import fc from 'fast-check';

(globalThis as { cwMutationRun?: boolean }).cwMutationRun = true;
fc.configureGlobal({ seed: 20261202, numRuns: 10 });
