/**
 * Sync step 3, derive: the server decides what a completion means (reliability.md T3). A record
 * claiming "passed" lands only when its last attempt bears it out against the server's own plan
 * (completionEvidence.ts); a failed one is evidence and lands as it is.
 */
import type { CompletionRecord } from '../../shared/schemas/sync';
import { missingForPassed } from './completionEvidence';
import type { CorePlan } from './syncPlans';
import type { BatchAnswer, Item } from './syncValidate';

export function derivePassed(items: Item<CompletionRecord>[], plans: Map<string, CorePlan>, answer: BatchAnswer, tagOf: (coreId: string) => string): Item<CompletionRecord>[] {
  return items.filter(({ index, record: r }) => {
    if (r.result !== 'passed') return true;
    const missing = missingForPassed(r, plans.get(r.coreId)!);
    if (!missing.length) return true;
    return answer.reject(index, r.clientId, 'unprocessable', `Record ${index + 1}: core ${tagOf(r.coreId)} cannot be recorded as passed: missing ${missing.join('; ')}. Finish the key check or record the core as failed.`, missing.map((m) => ({ field: 'attempts', message: m })));
  });
}
