/**
 * A per-federation counter that moves whenever the federation's panel decisions change (an
 * import committed or reverted, a batch posted through the API). Caches of computed results
 * key on it, so a change invalidates them without anyone having to know which caches exist.
 * In-process: a restart starts every cache empty anyway.
 */
const versions = new Map<number, number>();
const listeners = new Set<(federationId: number) => void>();

export function dataVersion(federationId: number): number {
  return versions.get(federationId) ?? 0;
}

/** Call after a transaction that changed a federation's assessments or ratings has committed. */
export function bumpDataVersion(federationId: number): void {
  versions.set(federationId, dataVersion(federationId) + 1);
  for (const listener of listeners) listener(federationId);
}

/** Runs `listener` after every bump; returns a function that stops it. */
export function onDataChange(listener: (federationId: number) => void): () => void {
  listeners.add(listener);
  return () => listeners.delete(listener);
}
