/**
 * Benchmark of the agreement engine on 1,000,000 invented ratings (333,334 assessments, panels
 * of three drawn from 40 classifiers, eight classes).
 *
 *   npx tsx bench/analysis.bench.ts
 *
 * Measures (median of several runs, each with its ratio to a floor measured in the same run:
 * a loop that only builds the assessment × class count table):
 *   - report: analyzeRatings without bootstrap (target < 2 s)
 *   - bootstrap: 1,000 resamples of Fleiss' kappa over assessments (target < 5 s)
 * Also reports the one-off cost of building the RatingSet from row objects.
 * Prints a table and writes bench/out/analysis.json.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import {
  analyzeRatings,
  bootstrapCountTable,
  buildRatingSet,
  countTable,
  fleissKappaValue,
  mulberry32,
  type RatingRow,
} from '../server/analysis';
import { DEFAULT_SCALE } from '../shared/scale';

const RATINGS = 1_000_000;
const PANEL = 3;
const CLASSIFIERS = 40;
const RUNS = Number(process.env.BENCH_RUNS ?? 5);

function generate(): RatingRow[] {
  const rng = mulberry32(2024);
  const codes = Array.from({ length: CLASSIFIERS }, (_, i) => `C${String(i + 1).padStart(2, '0')}`);
  const bias = codes.map(() => (rng.next() < 0.15 ? (rng.next() < 0.5 ? -1 : 1) : 0));
  const rows: RatingRow[] = [];
  const assessments = Math.ceil(RATINGS / PANEL);
  const start = Date.UTC(2019, 0, 1) / 86_400_000;
  for (let a = 0; a < assessments && rows.length < RATINGS; a++) {
    const truth = 2 + Math.floor(rng.next() * 8);
    const date = new Date((start + Math.floor(rng.next() * 2200)) * 86_400_000).toISOString().slice(0, 10);
    const panel = new Set<number>();
    while (panel.size < PANEL) panel.add(Math.floor(rng.next() * CLASSIFIERS));
    const r = rng.next();
    const kind = r < 0.8 ? 'first' : r < 0.95 ? 'review' : 'protest';
    for (const c of panel) {
      if (rows.length >= RATINGS) break;
      const u = rng.next();
      const noise = u < 0.15 ? -1 : u > 0.85 ? 1 : 0;
      const v = Math.min(9, Math.max(2, truth + noise + (rng.next() < 0.3 ? bias[c] : 0)));
      rows.push({
        assessmentId: `AS${a}`,
        athleteCode: `A${a % 90_000}`,
        eventCode: `E${a % 400}`,
        assessedOn: date,
        classifierCode: codes[c],
        sportClass: v,
        panelClass: rng.next() < 0.8 ? truth : null,
        kind,
      });
    }
  }
  return rows;
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

function time(fn: () => unknown): number {
  const t0 = performance.now();
  fn();
  return performance.now() - t0;
}

const t0 = performance.now();
const rows = generate();
const generateMs = performance.now() - t0;
let set = buildRatingSet(rows, DEFAULT_SCALE);
const buildMs = median(Array.from({ length: 3 }, () => time(() => (set = buildRatingSet(rows, DEFAULT_SCALE)))));

// Warm-up (JIT) once, not measured.
analyzeRatings(set);
bootstrapCountTable(countTable(set), fleissKappaValue, { B: 20, seed: 1 });

const floor: number[] = [];
const report: number[] = [];
const boot: number[] = [];
let checksum = 0;
for (let i = 0; i < RUNS; i++) {
  floor.push(time(() => (checksum += countTable(set).rows)));
  report.push(time(() => (checksum += analyzeRatings(set).counts.ratings)));
  boot.push(time(() => (checksum += bootstrapCountTable(countTable(set), fleissKappaValue, { B: 1000, seed: 7 + i }).B)));
}
const floorMs = median(floor);
const results = [
  { name: 'build RatingSet from 1,000,000 row objects (once per data load)', medianMs: buildMs, targetMs: null as number | null },
  { name: 'count table only (floor)', medianMs: floorMs, targetMs: null },
  { name: 'full report, no bootstrap', medianMs: median(report), targetMs: 2000 },
  { name: "1,000 bootstrap resamples of Fleiss' kappa", medianMs: median(boot), targetMs: 5000 },
].map((r) => ({ ...r, ratioToFloor: r.medianMs / floorMs, withinTarget: r.targetMs === null ? null : r.medianMs < r.targetMs }));

const out = {
  benchmark: 'analysis',
  ratings: set.ratingCount,
  assessments: set.assessmentCount,
  classifiers: set.classifierCodes.length,
  runs: RUNS,
  generateMs,
  node: process.version,
  results,
  runsMs: { floor, report, bootstrap: boot },
};

const w = Math.max(...results.map((r) => r.name.length));
console.log(
  `analysis benchmark: ${set.ratingCount} ratings, ${set.assessmentCount} assessments, ${set.classifierCodes.length} classifiers; median of ${RUNS} runs`,
);
console.log(`${'measure'.padEnd(w)}  ${'median ms'.padStart(10)}  ${'× floor'.padStart(8)}  ${'target'.padStart(8)}`);
for (const r of results) {
  const target = r.targetMs === null ? '' : `${r.withinTarget ? '<' : '>'} ${r.targetMs}`;
  console.log(
    `${r.name.padEnd(w)}  ${r.medianMs.toFixed(1).padStart(10)}  ${r.ratioToFloor.toFixed(1).padStart(8)}  ${target.padStart(8)}`,
  );
}
const outDir = fileURLToPath(new URL('./out/', import.meta.url));
mkdirSync(outDir, { recursive: true });
writeFileSync(`${outDir}analysis.json`, JSON.stringify(out, null, 2) + '\n');
if (checksum === -1) console.log('');
