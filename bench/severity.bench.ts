/**
 * Benchmark of the severity model (server/analysis/severity.ts; decision record 0009).
 *
 *   npx tsx bench/severity.bench.ts      (or npm run bench -- severity)
 *
 * Measures, as the median of several runs, the fit (classifierSeverity on a RatingSet already
 * built) on
 *   - the demo federation (about 2,000 assessments, 20 classifiers; target ≤ 1 s), and
 *   - 1,000,000 invented ratings: 333,334 assessments with panels of three from 40 classifiers
 *     in 4 regional pools, 90,000 athletes (target ≤ 10 s),
 * each with its ratio to a floor measured in the same run: one pass over the ratings that sums
 * the classes per classifier. Prints a table and writes bench/out/severity.json.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { buildRatingSet, classifierSeverity, type RatingRow, type RatingSet } from '../server/analysis';
import { DEMO_SCENARIO, generateScenario } from '../server/demo/generator';
import { DEFAULT_SCALE } from '../shared/scale';
import { simulateFederation } from '../tests/factories/severity-simulation';

const RUNS = Number(process.env.BENCH_RUNS ?? 7);

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

/** The floor: one pass over the ratings, summing classes per classifier. */
function onePass(set: RatingSet): number {
  const sums = new Float64Array(set.classifierCodes.length);
  for (let p = 0; p < set.ratingCount; p++) sums[set.ratingClassifier[p]] += set.ratingClass[p];
  return sums[0];
}

function demoSet(): RatingSet {
  const scenario = generateScenario(DEMO_SCENARIO);
  const rows: RatingRow[] = scenario.assessments.flatMap((a) =>
    a.ratings.map((r) => ({
      assessmentId: a.externalId,
      athleteCode: a.athleteCode,
      eventCode: a.eventCode,
      assessedOn: a.assessedOn,
      classifierCode: r.classifierCode,
      sportClass: r.sportClass,
      panelClass: a.panelClass,
      kind: a.kind,
    })),
  );
  return buildRatingSet(rows, scenario.federation.scale ?? DEFAULT_SCALE);
}

let t0 = performance.now();
const sets: { name: string; set: RatingSet; targetMs: number }[] = [
  { name: 'demo federation', set: demoSet(), targetMs: 1000 },
  {
    name: '1,000,000 ratings',
    set: simulateFederation({
      seed: 7,
      classifiers: 40,
      regions: 4,
      athletes: 90_000,
      assessments: 333_334,
      threeShare: 1,
      noise: [0.1, 0.2],
    }).set,
    targetMs: 10_000,
  },
];
const generateMs = performance.now() - t0;

const results = sets.map(({ name, set, targetMs }) => {
  classifierSeverity(set); // warm-up (JIT), not measured
  const floor: number[] = [];
  const fit: number[] = [];
  let checksum = 0;
  for (let i = 0; i < RUNS; i++) {
    floor.push(time(() => (checksum += onePass(set))));
    fit.push(time(() => (checksum += classifierSeverity(set).n)));
  }
  t0 = checksum; // keep the work observable
  const floorMs = median(floor);
  const fitMs = median(fit);
  return {
    name,
    ratings: set.ratingCount,
    assessments: set.assessmentCount,
    classifiers: set.classifierCodes.length,
    floorMs,
    medianMs: fitMs,
    /** Fastest run: on a loaded machine the median carries the waits for a core. */
    minMs: Math.min(...fit),
    ratioToFloor: fitMs / floorMs,
    targetMs,
    withinTarget: fitMs <= targetMs,
    runsMs: { floor, fit },
  };
});

console.log(`severity benchmark: median of ${RUNS} runs (data generated in ${(generateMs / 1000).toFixed(1)} s, not measured)`);
const w = Math.max(...results.map((r) => r.name.length));
const head = ['ratings', 'floor ms', 'fit ms', 'min ms', '× floor', 'target'].map((h) => h.padStart(9)).join('  ');
console.log(`${'fit on'.padEnd(w)}  ${head}`);
for (const r of results) {
  console.log(
    `${r.name.padEnd(w)}  ${[
      String(r.ratings),
      r.floorMs.toFixed(2),
      r.medianMs.toFixed(1),
      r.minMs.toFixed(1),
      r.ratioToFloor.toFixed(1),
      `${r.withinTarget ? '≤' : '>'} ${r.targetMs}`,
    ]
      .map((c) => c.padStart(9))
      .join('  ')}`,
  );
}
const outDir = fileURLToPath(new URL('./out/', import.meta.url));
mkdirSync(outDir, { recursive: true });
writeFileSync(
  `${outDir}severity.json`,
  JSON.stringify({ benchmark: 'severity', runs: RUNS, node: process.version, results }, null, 2) + '\n',
);
