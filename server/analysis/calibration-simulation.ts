/**
 * Simulated federations for the calibration rules' false-flag rates and power (decision record
 * 0008; `npm run simulate:flags`; tests/unit/analysis/calibration-simulation.test.ts).
 *
 * A federation is invented the way the demo generator invents one (server/demo/generator.ts):
 * athletes with a latent functional profile on the points scale (most near a class, 40 % of
 * those of classes 1.0/1.5 and 2.5/3.0 between the two), panels of three (85 %) or two drawn at
 * random from 16–20 classifiers over four seasons of six events, each classifier rating
 * profile + noise rounded to the nearest half point (noise s.d. 0.07 international, 0.085
 * national, 0.11 trainee, each ×U(0.85, 1.15)). In control, panels are unanimous on about
 * 70 % of assessments, as in the demo. Planted effects, on one classifier:
 *
 * - drift: `shift` points added from the classifier's rating number n − `after` on;
 * - lean: `shift` points added to every rating;
 * - erratic: on a share `rate` of ratings the rounded class moves one half point up or down
 *   (at random, away from the scale's ends), with no lean.
 *
 * Pure and deterministic for a seed.
 */
import { DEFAULT_SCALE } from '../../shared/scale';
import { evaluateCalibration, type CalibrationThresholds, type ClassifierCalibration } from './calibration-rules';
import { mulberry32, type Prng } from './prng';
import { buildRatingSet, dayToIsoDate, isoDateToDay, type RatingRow, type RatingSet } from './rating-set';

export type PlantedEffect =
  { kind: 'drift'; shift: number; after: number } | { kind: 'lean'; shift: number } | { kind: 'erratic'; rate: number };

export interface SimulatedFederation {
  set: RatingSet;
  classifiers: string[];
  /** The classifier carrying the planted effect, if any. */
  planted: { code: string; effect: PlantedEffect; changeIndex?: number } | null;
}

const CLASS_WEIGHTS = [0.2, 0.08, 0.12, 0.1, 0.14, 0.1, 0.12, 0.14];

function normal(rng: Prng): number {
  let u = 0;
  while (u === 0) u = rng.next();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * rng.next());
}

function sample(rng: Prng, n: number, k: number): number[] {
  const idx = Array.from({ length: n }, (_, i) => i);
  for (let i = 0; i < k; i++) {
    const j = i + rng.nextInt(n - i);
    [idx[i], idx[j]] = [idx[j], idx[i]];
  }
  return idx.slice(0, k);
}

export interface SimulationOptions {
  seed: number;
  /** Classifiers on the roster (default: 16–20 at random). */
  classifiers?: number;
  /** Assessments per classifier on the roster (default 100: about 285 ratings each). */
  assessmentsPerClassifier?: number;
  effect?: PlantedEffect;
}

export function simulateFederation(options: SimulationOptions): SimulatedFederation {
  const rng = mulberry32(options.seed);
  const C = options.classifiers ?? 16 + rng.nextInt(5);
  const codes = Array.from({ length: C }, (_, i) => `C${String(i + 1).padStart(2, '0')}`);
  const noise = codes.map((_, i) => (i % 4 === 0 ? 0.07 : i % 10 === 9 ? 0.11 : 0.085) * (0.85 + 0.3 * rng.next()));
  const athletes = Array.from({ length: 15 * C }, () => {
    let u = rng.next();
    let cls = 0;
    while (cls < 7 && (u -= CLASS_WEIGHTS[cls]) > 0) cls++;
    const value = 1 + cls / 2;
    let profile = value + (rng.next() - 0.5) * 0.24;
    if ((value === 1 || value === 1.5) && rng.next() < 0.4) profile = 1.25 + (rng.next() - 0.5) * 0.12;
    if ((value === 2.5 || value === 3) && rng.next() < 0.4) profile = 2.75 + (rng.next() - 0.5) * 0.12;
    return profile;
  });
  const events: number[] = [];
  for (let s = 0; s < 4; s++) {
    for (const md of ['10-08', '12-03', '02-04', '03-11', '04-15', '06-10']) {
      const year = md < '07' ? 2022 + s + 1 : 2022 + s;
      events.push(isoDateToDay(`${year}-${md}`)!);
    }
  }
  const A = (options.assessmentsPerClassifier ?? 100) * C;
  // Panels first, so a drift can start a given number of ratings before the end.
  const panels: { day: number; athlete: number; members: number[] }[] = [];
  for (let a = 0; a < A; a++) {
    const event = Math.floor((a * events.length) / A);
    const size = rng.next() < 0.15 ? 2 : 3;
    panels.push({ day: events[event] + (a % 3), athlete: rng.nextInt(athletes.length), members: sample(rng, C, size) });
  }
  const plantedIndex = options.effect ? rng.nextInt(C) : -1;
  let changeIndex: number | undefined;
  if (options.effect?.kind === 'drift') {
    let count = 0;
    for (const p of panels) if (p.members.includes(plantedIndex)) count++;
    changeIndex = Math.max(0, count - options.effect.after);
  }
  const seen = new Int32Array(C);
  const rows: RatingRow[] = [];
  panels.forEach((p, a) => {
    const assessmentId = `S-${a + 1}`;
    const date = dayToIsoDate(p.day);
    for (const c of p.members) {
      let value = athletes[p.athlete] + normal(rng) * noise[c];
      const effect = c === plantedIndex ? options.effect : undefined;
      if (effect?.kind === 'lean') value += effect.shift;
      if (effect?.kind === 'drift' && seen[c] >= changeIndex!) value += effect.shift;
      let half = Math.min(DEFAULT_SCALE.max, Math.max(DEFAULT_SCALE.min, Math.round(value * 2)));
      if (effect?.kind === 'erratic' && rng.next() < effect.rate) {
        const up = half === DEFAULT_SCALE.min ? true : half === DEFAULT_SCALE.max ? false : rng.next() < 0.5;
        half += up ? 1 : -1;
      }
      seen[c]++;
      rows.push({
        assessmentId,
        athleteCode: `A${p.athlete}`,
        eventCode: `E${p.day}`,
        assessedOn: date,
        classifierCode: codes[c],
        sportClass: half,
        kind: 'first',
      });
    }
  });
  const set = buildRatingSet(rows, DEFAULT_SCALE);
  return {
    set,
    classifiers: codes,
    planted: options.effect
      ? { code: codes[plantedIndex], effect: options.effect, ...(changeIndex !== undefined ? { changeIndex } : {}) }
      : null,
  };
}

// ---------------------------------------------------------------------------------------------
// The study

export interface Scenario {
  name: string;
  effect?: PlantedEffect;
}

export const STUDY_SCENARIOS: Scenario[] = [
  { name: 'in control' },
  ...[10, 20, 30, 50, 100].map((after) => ({
    name: `drift +0.5 after ${after} ratings`,
    effect: { kind: 'drift', shift: 0.5, after } as const,
  })),
  { name: 'drift −0.5 after 50 ratings', effect: { kind: 'drift', shift: -0.5, after: 50 } },
  { name: 'lean −0.25 (a quarter class)', effect: { kind: 'lean', shift: -0.25 } },
  { name: 'lean +0.25 (a quarter class)', effect: { kind: 'lean', shift: 0.25 } },
  { name: 'erratic (±0.5 on 40 %)', effect: { kind: 'erratic', rate: 0.4 } },
];

export interface ScenarioResult {
  name: string;
  federations: number;
  /** Share of federations with a flag of the rule on a classifier without a planted effect. */
  falseFlag: { bias: number; drift: number; agreement: number; any: number };
  /** Share of federations whose planted classifier holds each flag. */
  planted: { bias: number; drift: number; agreement: number } | null;
  /** Drift flags on the planted classifier with the planted direction. */
  driftDirectionRight: number | null;
  /** Median |estimated − planted| change position, in ratings, over detected drifts. */
  medianChangeError: number | null;
}

const RULES = ['bias', 'drift', 'agreement'] as const;

export function runScenario(scenario: Scenario, federations: number, seed: number, th: CalibrationThresholds): ScenarioResult {
  const falseFlag = { bias: 0, drift: 0, agreement: 0, any: 0 };
  const planted = { bias: 0, drift: 0, agreement: 0 };
  let directionRight = 0;
  const errors: number[] = [];
  for (let f = 0; f < federations; f++) {
    const fed = simulateFederation({ seed: seed * 100_003 + f, ...(scenario.effect ? { effect: scenario.effect } : {}) });
    const verdicts: ClassifierCalibration[] = evaluateCalibration(fed.set, th, { seed: f + 1 });
    let any = false;
    for (const rule of RULES) {
      if (verdicts.some((v) => v.code !== fed.planted?.code && v[rule].met)) {
        falseFlag[rule]++;
        any = true;
      }
    }
    if (any) falseFlag.any++;
    if (fed.planted) {
      const v = verdicts.find((x) => x.code === fed.planted!.code)!;
      for (const rule of RULES) if (v[rule].met) planted[rule]++;
      const effect = fed.planted.effect;
      if (effect.kind === 'drift' && v.drift.met) {
        if ((effect.shift > 0 ? 'up' : 'down') === v.drift.direction) directionRight++;
        errors.push(Math.abs(v.drift.nBefore - fed.planted.changeIndex!));
      }
    }
  }
  const share = (k: number) => k / federations;
  errors.sort((a, b) => a - b);
  const isDrift = scenario.effect?.kind === 'drift';
  return {
    name: scenario.name,
    federations,
    falseFlag: {
      bias: share(falseFlag.bias),
      drift: share(falseFlag.drift),
      agreement: share(falseFlag.agreement),
      any: share(falseFlag.any),
    },
    planted: scenario.effect ? { bias: share(planted.bias), drift: share(planted.drift), agreement: share(planted.agreement) } : null,
    driftDirectionRight: isDrift ? (planted.drift === 0 ? null : directionRight / planted.drift) : null,
    medianChangeError: isDrift && errors.length > 0 ? errors[Math.floor((errors.length - 1) / 2)] : null,
  };
}

const pct = (x: number | null) => (x === null ? '–' : `${(100 * x).toFixed(1)} %`);

/** The results as a Markdown table (the decision record prints it). */
export function studyTable(results: ScenarioResult[]): string {
  const lines = [
    '| scenario | federations | false flag: bias | false flag: drift | false flag: agreement | any false flag | planted gets bias | planted gets drift | planted gets agreement | drift direction right | median change error (ratings) |',
    '|---|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|',
  ];
  for (const r of results) {
    lines.push(
      `| ${r.name} | ${r.federations} | ${pct(r.falseFlag.bias)} | ${pct(r.falseFlag.drift)} | ${pct(r.falseFlag.agreement)} | ${pct(r.falseFlag.any)} | ` +
        `${pct(r.planted?.bias ?? null)} | ${pct(r.planted?.drift ?? null)} | ${pct(r.planted?.agreement ?? null)} | ${pct(r.driftDirectionRight)} | ${r.medianChangeError ?? '–'} |`,
    );
  }
  return lines.join('\n');
}
