/**
 * Invented federations for the severity model's recovery tests, the decision record's table
 * and the benchmark: classifiers in regional pools whose members share a lean, panels staffed
 * mostly from one pool, athletes with a continuous latent level on the points scale, ratings
 * rounded to the half-point class and clipped to the scale. Nothing here is real data.
 */
import { buildRatingSet, mulberry32, type Prng, type RatingRow, type RatingSet } from '../../server/analysis';
import { DEFAULT_SCALE } from '../../shared/scale';

export interface SimulationOptions {
  seed: number;
  classifiers?: number;
  regions?: number;
  athletes?: number;
  assessments?: number;
  /** Share of assessments whose panel comes from one regional pool (the rest: national events, any pool). */
  regionalShare?: number;
  /** Spread of the pools' leans (points): leans are evenly spaced in ±regionLean. */
  regionLean?: number;
  /** Standard deviation of each classifier's own severity around the pool's lean (points). */
  individualSd?: number;
  /** Range of the classifiers' error standard deviations (points). */
  noise?: [number, number];
  /** Share of panels of three (the rest are panels of two). */
  threeShare?: number;
  /** Range of the athletes' latent levels (points; default 1.0 to 4.5). */
  levels?: [number, number];
  /** When set, athletes sit near a class instead: a class of the scale ± this jitter (points). */
  classJitter?: number;
}

export interface SimulatedFederation {
  set: RatingSet;
  rows: RatingRow[];
  /** Planted severity per classifier code, centred to average 0 over the classifiers. */
  planted: Map<string, number>;
  regionOf: Map<string, number>;
}

function normal(rng: Prng): number {
  // Box–Muller.
  const u = 1 - rng.next();
  const v = rng.next();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
}

export function simulateFederation(options: SimulationOptions): SimulatedFederation {
  const rng = mulberry32(options.seed);
  const K = options.classifiers ?? 24;
  const R = options.regions ?? 4;
  const athletes = options.athletes ?? 300;
  const assessments = options.assessments ?? 2400;
  const regionalShare = options.regionalShare ?? 0.8;
  const regionLean = options.regionLean ?? 0.2;
  const individualSd = options.individualSd ?? 0.08;
  const [noiseLo, noiseHi] = options.noise ?? [0.15, 0.3];
  const threeShare = options.threeShare ?? 0.7;

  const codes = Array.from({ length: K }, (_, i) => `C${String(i + 1).padStart(2, '0')}`);
  const region = codes.map((_, i) => i % R);
  const lean = Array.from({ length: R }, (_, r) => (R === 1 ? 0 : -regionLean + (2 * regionLean * r) / (R - 1)));
  const raw = codes.map((_, i) => lean[region[i]] + individualSd * normal(rng));
  const mean = raw.reduce((s, x) => s + x, 0) / K;
  const severity = raw.map((x) => x - mean);
  const noise = codes.map(() => noiseLo + (noiseHi - noiseLo) * rng.next());
  const pools = Array.from({ length: R }, (_, r) => codes.map((_, i) => i).filter((i) => region[i] === r));

  const [levelLo, levelHi] = options.levels ?? [1, 4.5];
  const jitter = options.classJitter;
  const level = Array.from({ length: athletes }, () =>
    jitter === undefined ? levelLo + (levelHi - levelLo) * rng.next() : 1 + rng.nextInt(8) / 2 + jitter * (2 * rng.next() - 1),
  );
  const home = Array.from({ length: athletes }, () => rng.nextInt(R));
  const rows: RatingRow[] = [];
  const start = Date.UTC(2022, 6, 1) / 86_400_000;
  for (let a = 0; a < assessments; a++) {
    const athlete = a < athletes ? a : rng.nextInt(athletes);
    const size = rng.next() < threeShare ? 3 : 2;
    const pool = rng.next() < regionalShare ? pools[home[athlete]] : codes.map((_, i) => i);
    const panel = new Set<number>();
    while (panel.size < Math.min(size, pool.length)) panel.add(pool[rng.nextInt(pool.length)]);
    const date = new Date((start + Math.floor((a / assessments) * 1000)) * 86_400_000).toISOString().slice(0, 10);
    for (const c of panel) {
      const value = level[athlete] + severity[c] + noise[c] * normal(rng);
      const half = Math.min(DEFAULT_SCALE.max, Math.max(DEFAULT_SCALE.min, Math.round(value * 2)));
      rows.push({
        assessmentId: `AS${a + 1}`,
        athleteCode: `A${athlete + 1}`,
        eventCode: `E${Math.floor(a / 100) + 1}`,
        assessedOn: date,
        classifierCode: codes[c],
        sportClass: half,
        kind: a < athletes ? 'first' : 'review',
      });
    }
  }
  return {
    set: buildRatingSet(rows, DEFAULT_SCALE),
    rows,
    planted: new Map(codes.map((c, i) => [c, severity[i]])),
    regionOf: new Map(codes.map((c, i) => [c, region[i]])),
  };
}
