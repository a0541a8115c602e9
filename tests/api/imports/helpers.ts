import fs from 'node:fs';
import path from 'node:path';
import type { Express } from 'express';
import type request from 'supertest';
import type { AppContext } from '../../../server/context';

export const root = path.resolve(import.meta.dirname, '../../..');
export const fixture = (name: string) => path.join(root, 'fixtures/imports', name);
export const FEDERATION = 'kestrel-coast';
export const LEAD = 'lead@demo.panelwise.test';

type Agent = ReturnType<typeof request.agent>;

/** Uploads bytes (or a fixture) for a dry run, with the form fields given. */
export function upload(agent: Agent, file: { name: string; bytes?: Buffer }, fields: Record<string, string> = {}, federation = FEDERATION) {
  let req = agent.post(`/api/federations/${federation}/imports`);
  for (const [k, v] of Object.entries(fields)) req = req.field(k, v);
  const bytes = file.bytes ?? fs.readFileSync(fixture(file.name));
  return req.attach('file', bytes, { filename: path.basename(file.name), contentType: 'text/csv' });
}

/** Row counts of the federation's data tables (without imports, audit and staging bookkeeping). */
export function dataCounts(ctx: AppContext): Record<string, number> {
  const out: Record<string, number> = {};
  for (const table of ['assessments', 'ratings', 'classifiers', 'athletes', 'events', 'import_changes']) {
    out[table] = (ctx.sqlite.prepare(`select count(*) as n from ${table}`).get() as { n: number }).n;
  }
  return out;
}

export function federationId(ctx: AppContext, slug = FEDERATION): number {
  return (ctx.sqlite.prepare('select id from federations where slug = ?').get(slug) as { id: number }).id;
}

export type { Express };

/**
 * Waits until the background work caused by an earlier data change has finished (the
 * calibration flags are re-evaluated after each commit or revert, and may write flags, audit
 * entries and e-mail): `ctx.jobs.idle()` resolves once every tracked job has settled, so a
 * "nothing written" check measures only the request under test. Then counts.
 */
export async function settled(ctx: AppContext, count: (ctx: AppContext) => Record<string, number>): Promise<Record<string, number>> {
  await ctx.jobs.idle();
  return count(ctx);
}
