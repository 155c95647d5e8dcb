/** Which core the technician builds next: the first unbuilt one after this core, wrapping round the work order. */
export type BuildState = 'not-started' | 'in-progress' | 'rebuild' | 'finished' | 'set-aside' | 'installed';

const unbuilt = new Set<BuildState>(['not-started', 'in-progress', 'rebuild']);

export function nextCoreToBuild(coreIds: readonly string[], current: string, stateOf: (id: string) => BuildState): string | null {
  const at = coreIds.indexOf(current);
  const order = [...coreIds.slice(at + 1), ...coreIds.slice(0, Math.max(at, 0))];
  return order.find((id) => id !== current && unbuilt.has(stateOf(id))) ?? null;
}
