/**
 * The calibration rules' false-flag rates and power on simulated federations (decision record
 * 0008). Run: `npm run simulate:flags` (200 federations per scenario, about two minutes), or
 * `npm run simulate:flags -- 50` for a quicker look. Prints a Markdown table.
 */
import { runScenario, STUDY_SCENARIOS, studyTable } from '../server/analysis/calibration-simulation';
import { DEFAULT_FLAG_THRESHOLDS } from '../shared/schemas/analytics';

const federations = Number(process.argv[2] ?? 200);
const seed = Number(process.argv[3] ?? 2026);
if (!Number.isInteger(federations) || federations < 1) throw new Error(`federations "${process.argv[2]}" is not a positive whole number`);
const started = Date.now();
const results = STUDY_SCENARIOS.map((scenario) => {
  const r = runScenario(scenario, federations, seed, DEFAULT_FLAG_THRESHOLDS);
  process.stderr.write(`${scenario.name}: done\n`);
  return r;
});
const th = DEFAULT_FLAG_THRESHOLDS;
console.log(
  `Thresholds: false-discovery rate ${th.falseDiscoveryRate}, bias ≥ ${th.biasMin} points over ${th.biasWindow} ratings, ` +
    `agreement shortfall ≥ ${th.agreementGap} over ${th.agreementWindow} ratings, drift ≥ ${th.driftMin} points, ≥ ${th.minRatings} ratings; ` +
    `${federations} federations per scenario, seed ${seed}.\n`,
);
console.log(studyTable(results));
process.stderr.write(`${((Date.now() - started) / 1000).toFixed(1)} s\n`);
