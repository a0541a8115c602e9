/**
 * Benchmark of the calibration rules' evaluation (decision record 0008) on the demo federation
 * (20 classifiers, about 5,500 ratings), the work `evaluateFlags` does after each data change.
 *
 *   npm run bench -- flags
 *
 * Medians of several runs, each with its ratio to a floor measured in the same run:
 * `classifiersVsPanel` on the same ratings (every classifier against the panel, no tests).
 * Writes bench/out/flags.json.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { buildRatingSet, classifiersVsPanel, evaluateCalibration, type RatingRow } from '../server/analysis';
import { DEMO_SCENARIO, generateScenario } from '../server/demo/generator';
import { DEFAULT_FLAG_THRESHOLDS } from '../shared/schemas/analytics';

const RUNS = Number(process.env.BENCH_RUNS ?? 7);
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
const set = buildRatingSet(rows, scenario.federation.scale);

function time(fn: () => unknown): number {
  const t0 = performance.now();
  fn();
  return performance.now() - t0;
}
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[xs.length >> 1];

const floor: number[] = [];
const evaluation: number[] = [];
for (let i = 0; i < RUNS; i++) {
  floor.push(time(() => classifiersVsPanel(set)));
  evaluation.push(time(() => evaluateCalibration(set, DEFAULT_FLAG_THRESHOLDS)));
}
const result = {
  ratings: set.ratingCount,
  classifiers: 20,
  runs: RUNS,
  floorMs: median(floor),
  evaluationMs: median(evaluation),
  ratio: median(evaluation) / median(floor),
};
console.log(`ratings ${result.ratings}, ${RUNS} runs`);
console.log(`floor (classifiersVsPanel)      median ${result.floorMs.toFixed(1)} ms`);
console.log(`evaluateCalibration (3 rules)   median ${result.evaluationMs.toFixed(1)} ms  ×${result.ratio.toFixed(1)} the floor`);
const out = fileURLToPath(new URL('./out/', import.meta.url));
mkdirSync(out, { recursive: true });
writeFileSync(`${out}flags.json`, `${JSON.stringify(result, null, 2)}\n`);
