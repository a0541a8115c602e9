/**
 * The heavy work that runs off the request path, by name: `ctx.pool.run(name, payload, …)`.
 *
 * Each task calls the same service function the server used to call on the request path, with
 * the context it is given: in a worker thread (server/workers/worker.ts) a context on the
 * worker's own connection to the SQLite file; in the in-process executor (an in-memory
 * database in tests) the app's own context. Payloads and results cross a thread boundary, so
 * they are plain data (structured clone): no functions, no class instances.
 */
import type { FederationAccess } from '../auth/access';
import type { AppContext } from '../context';
import { createExport } from '../exports/service';
import { commitImport, dryRunCsv, revertImport, type Reporter } from '../imports/service';
import { athletesInFilter, federationData, filterOptions, researchBaseSet, type ViewFilters } from '../services/analytics-data';
import {
  boundaries,
  classDrift,
  classifierDetailFigures,
  classifierFigures,
  overviewFigures,
  pairDetail,
  pairs,
  raterDrift,
  severityNetwork,
  type FederationRef,
} from '../services/analytics';
import { evaluateFlags } from '../services/calibration-flags';
import type { FlagThresholds } from '../../shared/schemas/analytics';
import type { ExportRequest } from '../../shared/schemas/exports';
import type { UploadOptions } from '../../shared/schemas/imports';

/** What a running task may use besides its context: progress reports (sent to the main thread). */
export interface TaskTools {
  reporter: Reporter;
}

interface TaskSpec<P, R> {
  run(ctx: AppContext, payload: P, tools: TaskTools): R | Promise<R>;
  /** Writes to the database: never cut short by the pool's run timeout (a write is all or nothing anyway). */
  writes?: boolean;
}

const task = <P, R>(spec: TaskSpec<P, R>) => spec;

interface ViewPayload {
  federation: FederationRef;
  /** With `minCellAthletes` for researchers' views (decision record 0007). */
  filters: ViewFilters;
}

type Federation = FederationAccess['federation'];

export const tasks = {
  // The agreement dashboards (server/services/analytics.ts): every view's figures.
  'analytics.filters': task({ run: (ctx, p: { federation: FederationRef }) => filterOptions(federationData(ctx, p.federation)) }),
  'analytics.research-filters': task({
    run: (ctx, p: { federation: FederationRef; k: number }) => {
      const data = federationData(ctx, p.federation);
      return filterOptions(data, researchBaseSet(ctx, data, p.federation.id, p.k));
    },
  }),
  'analytics.athletes': task({
    run: (ctx, p: ViewPayload) => athletesInFilter(ctx, federationData(ctx, p.federation), p.federation.id, p.filters),
  }),
  'analytics.overview': task({ run: (ctx, p: ViewPayload) => overviewFigures(ctx, p.federation, p.filters) }),
  'analytics.classifiers': task({ run: (ctx, p: ViewPayload) => classifierFigures(ctx, p.federation, p.filters) }),
  'analytics.severity-network': task({ run: (ctx, p: ViewPayload) => severityNetwork(ctx, p.federation, p.filters) }),
  'analytics.classifier': task({
    run: (ctx, p: ViewPayload & { code: string; thresholds: FlagThresholds }) =>
      classifierDetailFigures(ctx, p.federation, p.filters, p.code, p.thresholds),
  }),
  'analytics.pairs': task({ run: (ctx, p: ViewPayload) => pairs(ctx, p.federation, p.filters) }),
  'analytics.pair': task({ run: (ctx, p: ViewPayload & { a: string; b: string }) => pairDetail(ctx, p.federation, p.filters, p.a, p.b) }),
  'analytics.boundaries': task({ run: (ctx, p: ViewPayload) => boundaries(ctx, p.federation, p.filters) }),
  'analytics.rater-drift': task({
    run: (ctx, p: ViewPayload & { thresholds: FlagThresholds }) => raterDrift(ctx, p.federation, p.filters, p.thresholds),
  }),
  'analytics.class-drift': task({
    run: (ctx, p: ViewPayload & { withChanges: boolean }) => classDrift(ctx, p.federation, p.filters, p.withChanges),
  }),

  // Calibration flags: the engine's figures on all ratings, then the flags' rows and the leads' e-mail.
  'flags.evaluate': task({
    writes: true,
    run: (ctx, p: { federationId: number; cause?: string }) => evaluateFlags(ctx, p.federationId, { cause: p.cause }),
  }),

  // A research export: read the scope, build the files, store them (server/exports/service.ts).
  'exports.create': task({
    writes: true,
    run: (ctx, p: { access: FederationAccess; request: ExportRequest }) => createExport(ctx, p.access, p.request),
  }),

  // Imports (server/imports/service.ts): the dry run of an uploaded file, commit and revert.
  'imports.dry-run': task({
    writes: true,
    run: (
      ctx,
      p: { federation: Federation; userId: number | null; file: { bytes: Uint8Array; name: string | null }; options: UploadOptions },
      tools,
    ) => dryRunCsv(ctx, p.federation, p.userId, p.file, p.options, tools.reporter),
  }),
  'imports.commit': task({
    writes: true,
    run: (ctx, p: { federation: Federation; userId: number | null; importId: number; confirmAthleteChanges: boolean }, tools) =>
      commitImport(ctx, p.federation, p.userId, p.importId, tools.reporter, { confirmAthleteChanges: p.confirmAthleteChanges }),
  }),
  'imports.revert': task({
    writes: true,
    run: (ctx, p: { federation: Federation; userId: number | null; importId: number }, tools) =>
      revertImport(ctx, p.federation, p.userId, p.importId, tools.reporter),
  }),
};

export type Tasks = typeof tasks;
export type TaskName = keyof Tasks;
export type TaskPayload<N extends TaskName> = Parameters<Tasks[N]['run']>[1];
export type TaskResult<N extends TaskName> = Awaited<ReturnType<Tasks[N]['run']>>;

export function taskSpec(name: string): TaskSpec<unknown, unknown> {
  const spec = (tasks as Record<string, TaskSpec<unknown, unknown>>)[name];
  if (!spec) throw new Error(`Unknown task "${name}"`);
  return spec;
}
