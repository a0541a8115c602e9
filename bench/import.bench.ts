/**
 * Benchmark of a CSV import of 1,000,000 ratings (333,334 assessments, panels of three from the
 * demo roster), generated into a temporary folder, through the same code path as a lead's
 * upload: HTTP multipart upload to a server process (node --import tsx server/main.ts) → dry run
 * (read, check, compare, stage) → commit in one transaction. Each run starts a fresh server on a
 * fresh database seeded with the demo. (The server runs in its own process, as in production,
 * so that background work it starts after a commit does not delay this process reading the
 * answer.)
 *
 *   npm run bench -- import
 *
 * Reports the median of several runs (BENCH_RUNS, default 3) of rows per second, and the ratio to
 * a floor measured in the same run on an identical database: a bare better-sqlite3 loop of
 * prepared single-row inserts of the same assessments and ratings in one transaction (target
 * ratio ≥ 0.4; target total < 20 s). Writes bench/out/import.json.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { readCsvText } from '../server/imports/csv-reader';
import { createTestApp, type TestApp } from '../tests/helpers/test-app';
import { writeLongCsv } from '../tests/factories/import-csv';

const RATINGS = 1_000_000;
const RUNS = Number(process.env.BENCH_RUNS ?? 3);
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'panelwise-import-bench-'));
const csvPath = path.join(dir, 'ratings.csv');

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

async function freshApp(run: number, name: string): Promise<TestApp> {
  const file = path.join(dir, `${name}-${run}.db`);
  return createTestApp({ seed: 'demo', databasePath: file });
}

/** The floor: prepared single-row inserts of the same rows, codes resolved beforehand. */
function floorRun(t: TestApp, text: string): number {
  const read = readCsvText(text);
  const batch = read.batch!;
  const sqlite = t.ctx.sqlite;
  const federationId = sqlite.prepare("select id from federations where slug = 'kestrel-coast'").pluck().get() as number;
  const ids = (table: string) =>
    new Map(
      (sqlite.prepare(`select code, id from ${table} where federation_id = ?`).raw(true).all(federationId) as [string, number][]).map(
        ([c, i]) => [c, i],
      ),
    );
  const classifiers = ids('classifiers');
  const athletes = ids('athletes');
  const events = ids('events');
  const importId = Number(
    sqlite.prepare("insert into imports (federation_id, source, status) values (?, 'csv', 'committed')").run(federationId).lastInsertRowid,
  );
  const a = batch.assessments;
  const r = batch.ratings;
  const insertAssessment = sqlite.prepare(
    'insert into assessments (federation_id, external_id, athlete_id, event_id, assessed_on, kind, panel_class, note, import_id) values (?, ?, ?, ?, ?, ?, ?, ?, ?)',
  );
  const insertRating = sqlite.prepare('insert into ratings (assessment_id, classifier_id, sport_class, import_id) values (?, ?, ?, ?)');
  const t0 = performance.now();
  sqlite
    .transaction(() => {
      const dbId: number[] = [];
      for (let i = 0; i < a.externalId.length; i++) {
        dbId.push(
          Number(
            insertAssessment.run(
              federationId,
              a.externalId[i],
              athletes.get(a.athleteCode[i]),
              events.get(a.eventCode[i]),
              a.assessedOn[i],
              'first',
              a.panelClass[i],
              a.note[i],
              importId,
            ).lastInsertRowid,
          ),
        );
      }
      for (let k = 0; k < r.assessment.length; k++)
        insertRating.run(dbId[r.assessment[k]], classifiers.get(r.classifierCode[k]), r.sportClass[k], importId);
    })
    .immediate();
  return performance.now() - t0;
}

async function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const server = net.createServer().listen(0, () => {
      const { port } = server.address() as net.AddressInfo;
      server.close(() => resolve(port));
    });
  });
}

async function startServer(databasePath: string, port: number): Promise<ChildProcess> {
  const root = fileURLToPath(new URL('../', import.meta.url));
  const proc = spawn(process.execPath, ['--import', 'tsx', 'server/main.ts'], {
    cwd: root,
    env: { ...process.env, PORT: String(port), DATABASE_PATH: databasePath, NODE_ENV: 'test', LOG_LEVEL: 'warn' },
    stdio: ['ignore', 'ignore', 'inherit'],
  });
  for (let i = 0; i < 600; i++) {
    try {
      if ((await fetch(`http://localhost:${port}/api/health`)).ok) return proc;
    } catch {
      // not up yet
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error('the server did not start');
}

async function importRun(run: number): Promise<{ totalMs: number; dryRunMs: number; commitMs: number; ratings: number }> {
  const port = await freePort();
  const server = await startServer(path.join(dir, `import-${run}.db`), port);
  try {
    const base = `http://localhost:${port}/api`;
    const signIn = await fetch(`${base}/session`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ email: 'lead@demo.panelwise.test', password: 'panelwise-demo' }),
    });
    const cookie = signIn.headers
      .getSetCookie()
      .map((c) => c.split(';')[0])
      .join('; ');
    const bytes = fs.readFileSync(csvPath);
    const t0 = performance.now();
    const form = new FormData();
    form.append('file', new Blob([bytes], { type: 'text/csv' }), 'ratings.csv');
    const dry = await fetch(`${base}/federations/kestrel-coast/imports`, { method: 'POST', body: form, headers: { cookie } });
    const body = (await dry.json()) as { outcome: string; importId: number; counts: { ratings: { new: number } } };
    const t1 = performance.now();
    if (dry.status !== 200 || body.outcome !== 'ready')
      throw new Error(`dry run failed: ${dry.status} ${JSON.stringify(body).slice(0, 500)}`);
    const commit = await fetch(`${base}/federations/kestrel-coast/imports/${body.importId}/commit`, {
      method: 'POST',
      headers: { cookie },
    });
    await commit.json();
    const t2 = performance.now();
    if (commit.status !== 200) throw new Error(`commit failed: ${commit.status}`);
    return { totalMs: t2 - t0, dryRunMs: t1 - t0, commitMs: t2 - t1, ratings: body.counts.ratings.new };
  } finally {
    const exited = new Promise((r) => server.once('exit', r));
    server.kill('SIGKILL');
    await exited;
  }
}

const g0 = performance.now();
await writeLongCsv(csvPath, { ratings: RATINGS, prefix: 'BENCH-', compact: true });
const generateMs = performance.now() - g0;
const fileBytes = fs.statSync(csvPath).size;
const text = fs.readFileSync(csvPath, 'utf8');

const runs: { totalMs: number; dryRunMs: number; commitMs: number; floorMs: number; ratio: number }[] = [];
for (let i = 0; i < RUNS; i++) {
  const imported = await importRun(i);
  if (imported.ratings !== RATINGS) throw new Error(`imported ${imported.ratings} ratings, not ${RATINGS}`);
  const tf = await freshApp(i, 'floor');
  const floorMs = floorRun(tf, text);
  await tf.close();
  const ratio = RATINGS / imported.totalMs / (RATINGS / floorMs);
  runs.push({ ...imported, floorMs, ratio });
  console.log(
    `run ${i + 1}: import ${(imported.totalMs / 1000).toFixed(2)} s (dry run ${(imported.dryRunMs / 1000).toFixed(2)} s, commit ${(imported.commitMs / 1000).toFixed(2)} s); floor ${(floorMs / 1000).toFixed(2)} s; ratio ${ratio.toFixed(2)}`,
  );
}
fs.rmSync(dir, { recursive: true, force: true });

const totalMs = median(runs.map((r) => r.totalMs));
const floorMs = median(runs.map((r) => r.floorMs));
const out = {
  benchmark: 'import',
  ratings: RATINGS,
  assessments: Math.ceil(RATINGS / 3),
  fileBytes,
  runs: RUNS,
  generateMs,
  node: process.version,
  median: {
    totalMs,
    dryRunMs: median(runs.map((r) => r.dryRunMs)),
    commitMs: median(runs.map((r) => r.commitMs)),
    floorMs,
    rowsPerSecond: RATINGS / (totalMs / 1000),
    floorRowsPerSecond: RATINGS / (floorMs / 1000),
    ratioToFloor: median(runs.map((r) => r.ratio)),
  },
  targets: { totalMs: 20_000, ratioToFloor: 0.4 },
  withinTargets: { totalMs: totalMs < 20_000, ratioToFloor: median(runs.map((r) => r.ratio)) >= 0.4 },
  runsDetail: runs,
};
console.log(
  `import benchmark: ${RATINGS} ratings, ${(fileBytes / 1e6).toFixed(1)} MB; median of ${RUNS}: ${(totalMs / 1000).toFixed(2)} s, ${Math.round(out.median.rowsPerSecond)} ratings/s; floor ${Math.round(out.median.floorRowsPerSecond)} ratings/s; ratio ${out.median.ratioToFloor.toFixed(2)} (target ≥ 0.4, < 20 s)`,
);
const outDir = fileURLToPath(new URL('./out/', import.meta.url));
fs.mkdirSync(outDir, { recursive: true });
fs.writeFileSync(`${outDir}import.json`, JSON.stringify(out, null, 2) + '\n');
process.exit(0);
