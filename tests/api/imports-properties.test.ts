/**
 * Random and mangled files through HTTP: never a 500; a refusal writes nothing and names a row
 * or says why the file was refused; a dry run that passes writes nothing to the federation's
 * data; its commit writes exactly what it counted, and its revert takes exactly that away.
 * Before each "nothing written" check, the background work of the previous commit or revert
 * (flag evaluation) is awaited through ctx.jobs.idle() (see settled() in ./imports/helpers).
 */
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, signedInAgent, tableCounts, type TestApp } from '../helpers/test-app';
import { anyFileArb } from '../factories/csv-arbitrary';
import { FEDERATION, LEAD, settled, upload } from './imports/helpers';

let t: TestApp;
let lead: Awaited<ReturnType<typeof signedInAgent>>;

beforeAll(async () => {
  t = await createTestApp({ seed: 'demo' });
  lead = await signedInAgent(t.app, LEAD);
});
afterAll(() => t.close());

const DATA = ['assessments', 'ratings', 'classifiers', 'athletes', 'events', 'import_changes'];
const data = (counts: Record<string, number>) => Object.fromEntries(DATA.map((k) => [k, counts[k]]));

describe('imports through HTTP, property-based', () => {
  it('never a 500, never a partial write, every refusal says where or why', async () => {
    const outcomes: Record<string, number> = {};
    await fc.assert(
      fc.asyncProperty(anyFileArb, fc.boolean(), async (bytes, addClassifiers) => {
        const before = await settled(t.ctx, tableCounts);
        const res = await upload(lead, { name: 'random.csv', bytes }, addClassifiers ? { addClassifiers: 'true' } : {});
        expect(res.status).toBe(200);
        const dry = res.body;
        outcomes[dry.outcome] = (outcomes[dry.outcome] ?? 0) + 1;
        if (dry.outcome !== 'ready') {
          expect(tableCounts(t.ctx)).toEqual(before);
          if (dry.outcome === 'refused') {
            expect(dry.errorCount).toBeGreaterThan(0);
            for (const e of dry.errors) expect(e.row !== null ? e.message.includes(`ow ${e.row}`) : e.message.length > 10).toBe(true);
          }
          return;
        }
        expect(data(tableCounts(t.ctx))).toEqual(data(before));
        const commit = await lead.post(`/api/federations/${FEDERATION}/imports/${dry.importId}/commit`);
        expect(commit.status).toBe(200);
        const after = tableCounts(t.ctx);
        expect(after.assessments - before.assessments).toBe(dry.counts.assessments.new);
        expect(after.ratings - before.ratings).toBe(dry.counts.ratings.new);
        expect(after.classifiers - before.classifiers).toBe(dry.counts.classifiers.new);
        expect(after.athletes - before.athletes).toBe(dry.counts.athletes.new);
        expect(after.events - before.events).toBe(dry.counts.events.new);
        const revert = await lead.post(`/api/federations/${FEDERATION}/imports/${dry.importId}/revert`);
        expect(revert.status).toBe(200);
        expect(data(tableCounts(t.ctx))).toEqual(data(before));
      }),
      { numRuns: 300, seed: 4242 },
    );
    expect(outcomes.ready).toBeGreaterThan(20);
    expect(outcomes.refused).toBeGreaterThan(20);
    // A budget for a shared, loaded 2-core machine; nothing in the test waits for time (settled()
    // awaits ctx.jobs.idle(), the background flag evaluations started by each commit and revert).
  }, 480_000);
});
