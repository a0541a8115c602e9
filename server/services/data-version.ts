/**
 * A per-federation counter that moves whenever the federation's panel decisions change (an
 * import committed or reverted, a batch posted through the API). Caches of computed results
 * key on it, so a change invalidates them without anyone having to know which caches exist.
 *
 * The counters and their listeners belong to one app (`ctx.dataVersions`): two apps in one
 * process (tests) never share them, and a restart starts every cache empty anyway. Worker
 * threads (server/workers) follow the main thread's counters: each task carries the version
 * it was asked at, and a change made inside a worker is reported back and bumped here.
 */
import type { AppContext } from '../context';

export class DataVersions {
  private readonly versions = new Map<number, number>();
  private readonly listeners = new Set<(federationId: number) => void>();

  of(federationId: number): number {
    return this.versions.get(federationId) ?? 0;
  }

  /** Moves the counter and tells every listener (call after the change has committed). */
  bump(federationId: number): void {
    this.versions.set(federationId, this.of(federationId) + 1);
    for (const listener of this.listeners) listener(federationId);
  }

  /** Sets the counter without telling anyone (a worker following the main thread). */
  follow(federationId: number, version: number): void {
    this.versions.set(federationId, version);
  }

  /** Runs `listener` after every bump; returns a function that stops it. */
  onChange(listener: (federationId: number) => void): () => void {
    this.listeners.add(listener);
    return () => this.listeners.delete(listener);
  }
}

export function dataVersion(ctx: Pick<AppContext, 'dataVersions'>, federationId: number): number {
  return ctx.dataVersions.of(federationId);
}

/** Call after a transaction that changed a federation's assessments or ratings has committed. */
export function bumpDataVersion(ctx: Pick<AppContext, 'dataVersions'>, federationId: number): void {
  ctx.dataVersions.bump(federationId);
}

/** Runs `listener` after every bump of this app's counters; returns a function that stops it. */
export function onDataChange(ctx: Pick<AppContext, 'dataVersions'>, listener: (federationId: number) => void): () => void {
  return ctx.dataVersions.onChange(listener);
}
