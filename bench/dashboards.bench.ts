/**
 * Benchmark of the agreement dashboards on the demo data (about 1,900 assessments, 5,500 ratings).
 *
 *   npx tsx bench/dashboards.bench.ts      (or npm run bench -- dashboards)
 *
 * Starts the app on loopback (a throw-away database seeded with the demo), signs in as the lead
 * and measures request latency over HTTP, one request at a time:
 *   - floor: GET /api/health in the same run;
 *   - overview, warm: GET …/analytics/overview once its result is cached (target median < 100 ms);
 *   - overview, cold: the first request after the data version moves (whole report with 1,000
 *     bootstrap resamples of alpha, and the quarterly trend with 200 resamples per quarter);
 *   - the other views warm.
 * Each run takes the median of REQUESTS requests; the result is the median of RUNS runs with its
 * ratio to the floor's median. Writes bench/out/dashboards.json.
 */
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import type { AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { createTestApp } from '../tests/helpers/test-app';

const RUNS = Number(process.env.BENCH_RUNS ?? 5);
const REQUESTS = Number(process.env.BENCH_REQUESTS ?? 40);

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

const dir = mkdtempSync(path.join(os.tmpdir(), 'panelwise-bench-dash-'));
const t = await createTestApp({ seed: 'demo', databasePath: path.join(dir, 'bench.db') });
const server = t.app.listen(0, '127.0.0.1');
await new Promise<void>((resolve) => server.once('listening', () => resolve()));
const origin = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;

const signIn = await fetch(`${origin}/api/session`, {
  method: 'POST',
  headers: { 'content-type': 'application/json' },
  body: JSON.stringify({ email: 'lead@demo.panelwise.test', password: 'panelwise-demo' }),
});
if (signIn.status !== 201) throw new Error(`sign-in failed: ${signIn.status}`);
const cookie = signIn.headers
  .getSetCookie()
  .map((c) => c.split(';')[0])
  .join('; ');
const federationId = (t.ctx.sqlite.prepare("select id from federations where slug = 'kestrel-coast'").get() as { id: number }).id;

async function timed(url: string): Promise<number> {
  const t0 = performance.now();
  const res = await fetch(origin + url, { headers: { cookie } });
  await res.arrayBuffer();
  const ms = performance.now() - t0;
  if (res.status !== 200) throw new Error(`${url}: ${res.status}`);
  return ms;
}

async function medianOf(url: string, n = REQUESTS): Promise<number> {
  const xs: number[] = [];
  for (let i = 0; i < n; i++) xs.push(await timed(url));
  return median(xs);
}

const base = '/api/federations/kestrel-coast/analytics';
const views = ['/overview', '/classifiers', '/classifiers/C05', '/pairs', '/boundaries', '/drift/raters', '/drift/classes'];
// Warm-up (JIT, caches, flags evaluated once).
for (const v of views) await timed(base + v);
await medianOf('/api/health', 20);

const runs: Record<string, number[]> = {
  floor: [],
  overviewWarm: [],
  overviewCold: [],
  ...Object.fromEntries(views.slice(1).map((v) => [v, []])),
};
for (let r = 0; r < RUNS; r++) {
  runs.floor.push(await medianOf('/api/health'));
  runs.overviewWarm.push(await medianOf(`${base}/overview`));
  t.ctx.dataVersions.bump(federationId);
  // Let the background flag re-evaluation after the bump finish before timing.
  await t.ctx.jobs.idle();
  runs.overviewCold.push(await timed(`${base}/overview`));
  for (const v of views.slice(1)) runs[v].push(await medianOf(base + v, 10));
}

const floorMs = median(runs.floor);
const rows = [
  { name: 'GET /api/health (floor)', key: 'floor', targetMs: null as number | null },
  { name: 'overview, warm', key: 'overviewWarm', targetMs: 100 },
  { name: 'overview, cold (after a data change)', key: 'overviewCold', targetMs: null },
  ...views.slice(1).map((v) => ({ name: `${v.slice(1)}, warm`, key: v, targetMs: null })),
].map((r) => {
  const medianMs = median(runs[r.key]);
  return {
    name: r.name,
    medianMs,
    ratioToFloor: medianMs / floorMs,
    targetMs: r.targetMs,
    withinTarget: r.targetMs === null ? null : medianMs < r.targetMs,
  };
});

const w = Math.max(...rows.map((r) => r.name.length));
console.log(`dashboards benchmark: demo data over HTTP on loopback; median of ${RUNS} runs of ${REQUESTS} sequential requests`);
console.log(`${'measure'.padEnd(w)}  ${'median ms'.padStart(10)}  ${'× floor'.padStart(8)}  ${'target'.padStart(8)}`);
for (const r of rows) {
  const target = r.targetMs === null ? '' : `${r.withinTarget ? '<' : '>'} ${r.targetMs}`;
  console.log(
    `${r.name.padEnd(w)}  ${r.medianMs.toFixed(2).padStart(10)}  ${r.ratioToFloor.toFixed(1).padStart(8)}  ${target.padStart(8)}`,
  );
}
const outDir = fileURLToPath(new URL('./out/', import.meta.url));
mkdirSync(outDir, { recursive: true });
writeFileSync(
  `${outDir}dashboards.json`,
  JSON.stringify({ benchmark: 'dashboards', runs: RUNS, requests: REQUESTS, node: process.version, results: rows, runsMs: runs }, null, 2) +
    '\n',
);

server.close();
await t.close();
rmSync(dir, { recursive: true, force: true });
process.exit(0);
