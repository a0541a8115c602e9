/**
 * Class transitions of athletes between successive assessments, and how often reviews and
 * protests changed the class.
 *
 * The outcome of an assessment is the panel's recorded final class; where none is recorded,
 * the median of the panel's ratings when it is a class of the scale (an even panel split
 * evenly between two classes has no outcome and is skipped).
 */
import { classLabel, dayToIsoDate, type RatingSet } from './rating-set';
import { proportionStat, type StatResult } from './result';
import { ASSESSMENT_KINDS } from '../../shared/schemas/common';

/** Outcome class index per assessment, −1 when undetermined. */
export function assessmentOutcomes(set: RatingSet): Int32Array {
  const out = new Int32Array(set.assessmentCount).fill(-1);
  const scratch: number[] = [];
  for (let a = 0; a < set.assessmentCount; a++) {
    if (set.panelClass[a] >= 0) {
      out[a] = set.panelClass[a]!;
      continue;
    }
    scratch.length = 0;
    for (let p = set.ratingStart[a]; p < set.ratingStart[a + 1]; p++) scratch.push(set.ratingClass[p]);
    if (scratch.length === 0) continue;
    scratch.sort((x, y) => x - y);
    const m = scratch.length;
    const med = m % 2 === 1 ? scratch[(m - 1) / 2] : (scratch[m / 2 - 1] + scratch[m / 2]) / 2;
    if (Number.isInteger(med)) out[a] = med;
  }
  return out;
}

export interface ClassTransitions {
  classes: string[];
  /** counts[from][to] over successive assessments of the same athlete. */
  counts: number[][];
  /** Successive pairs counted. */
  n: number;
  /** Share of successive pairs whose class changed. */
  changed: StatResult;
  /** Share of reviews that changed the athlete's class (vs the previous outcome). */
  reviewsChanged: StatResult;
  /** Share of protests that changed the athlete's class. */
  protestsChanged: StatResult;
  /** Every change, for drill-down. */
  changes: { athleteCode: string; from: string; to: string; on: string; kind: string; assessmentId: string }[];
}

export function classTransitions(set: RatingSet): ClassTransitions {
  const q = set.q;
  const outcome = assessmentOutcomes(set);
  const order = Array.from({ length: set.assessmentCount }, (_, a) => a).filter((a) => outcome[a] >= 0);
  order.sort((x, y) => set.athlete[x] - set.athlete[y] || set.day[x] - set.day[y] || x - y);
  const flat = new Float64Array(q * q);
  let n = 0;
  let changed = 0;
  let reviews = 0;
  let reviewsChanged = 0;
  let protests = 0;
  let protestsChanged = 0;
  const changes: ClassTransitions['changes'] = [];
  for (let i = 1; i < order.length; i++) {
    const prev = order[i - 1];
    const cur = order[i];
    if (set.athlete[prev] !== set.athlete[cur]) continue;
    const from = outcome[prev];
    const to = outcome[cur];
    flat[from * q + to]++;
    n++;
    const diff = from !== to;
    if (diff) {
      changed++;
      changes.push({
        athleteCode: set.athleteCodes[set.athlete[cur]],
        from: classLabel(set, from),
        to: classLabel(set, to),
        on: dayToIsoDate(set.day[cur]),
        kind: ASSESSMENT_KINDS[set.kind[cur]],
        assessmentId: set.assessmentIds[cur],
      });
    }
    if (set.kind[cur] === 1) {
      reviews++;
      if (diff) reviewsChanged++;
    } else if (set.kind[cur] === 2) {
      protests++;
      if (diff) protestsChanged++;
    }
  }
  const counts: number[][] = [];
  for (let i = 0; i < q; i++) counts.push(Array.from(flat.subarray(i * q, (i + 1) * q)));
  return {
    classes: Array.from({ length: q }, (_, i) => classLabel(set, i)),
    counts,
    n,
    changed: proportionStat(changed, n),
    reviewsChanged: proportionStat(reviewsChanged, reviews),
    protestsChanged: proportionStat(protestsChanged, protests),
    changes,
  };
}
