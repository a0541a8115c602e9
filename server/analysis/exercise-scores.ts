/**
 * Scores of a calibration exercise: each classifier's answers against the reference class the
 * senior panel agreed for each case, and the spread of the answers per case.
 *
 * Per classifier, over the cases they answered:
 * - exact / within-half agreement with the reference: shares with |answer − reference| = 0 and
 *   ≤ one class step (half a point), with Wilson (1927) intervals (`proportionStat`);
 * - Cohen's quadratically weighted kappa of answer against reference over the federation's full
 *   scale (Cohen 1968; standard error Fleiss, Cohen & Everitt 1969) — the engine's `cohenKappa`;
 * - bias: mean of (answer − reference) in points (positive = above the reference), with a Wald
 *   interval from the sample standard deviation;
 * - points at stake: the mean absolute difference in points, and the shares off by half a point
 *   (one class) or more and by a whole point or more. A player's class is the number of points
 *   they count for in a line-up, so a difference in class is a difference in points on court.
 *
 * Per case: the count of each class answered, lowest and highest, the range in points, the share
 * equal to the reference, and — where the answers fall in more than one class — the boundary that
 * divides them best (the one with the most answers on its smaller side; ties go to the boundary
 * nearest the reference, then to the lower one) with the skills ticked on each side of it.
 *
 * Pure: plain arrays in, numbers out. Agreement with a reference describes consistency with the
 * senior panel's class for these cases, not the correctness of anyone's class.
 */
import { mean, sampleStandardDeviation } from 'simple-statistics';
import { classIndex, type ClassScale } from '../../shared/scale';
import { cohenKappa, contingencyTable, type KappaResult } from './cohen-kappa';
import { definedStat, proportionStat, undefinedStat, type StatResult } from './result';

export interface ScoredCase {
  id: number;
  /** The reference class in half points. */
  reference: number;
}

export interface ScoredAnswer {
  /** Who answered (a classifier code). */
  rater: string;
  caseId: number;
  /** Half points. */
  sportClass: number;
  /** Skills ticked as deciding the class. */
  skills: readonly string[];
}

export interface RaterScore {
  rater: string;
  answered: number;
  exact: StatResult;
  withinHalf: StatResult;
  quadraticKappa: KappaResult;
  bias: StatResult;
  meanAbsolutePoints: number | null;
  offByHalfPoint: StatResult;
  offByOnePoint: StatResult;
}

/** Each rater's scores against the references (raters in order of first answer). */
export function raterScores(cases: readonly ScoredCase[], answers: readonly ScoredAnswer[], scale: ClassScale): RaterScore[] {
  const reference = new Map(cases.map((c) => [c.id, c.reference]));
  const byRater = new Map<string, ScoredAnswer[]>();
  for (const a of answers) {
    if (!reference.has(a.caseId)) continue;
    let list = byRater.get(a.rater);
    if (!list) byRater.set(a.rater, (list = []));
    list.push(a);
  }
  const q = scale.max - scale.min + 1;
  const out: RaterScore[] = [];
  for (const [rater, list] of byRater) {
    const diffs = list.map((a) => a.sportClass - reference.get(a.caseId)!);
    const n = diffs.length;
    const count = (test: (d: number) => boolean) => diffs.filter(test).length;
    const table = contingencyTable(
      list.map((a) => classIndex(a.sportClass, scale)),
      list.map((a) => classIndex(reference.get(a.caseId)!, scale)),
      q,
    );
    const points = diffs.map((d) => d / 2);
    out.push({
      rater,
      answered: n,
      exact: proportionStat(
        count((d) => d === 0),
        n,
      ),
      withinHalf: proportionStat(
        count((d) => Math.abs(d) <= 1),
        n,
      ),
      quadraticKappa: cohenKappa(table, q, 'quadratic'),
      bias:
        n === 0
          ? undefinedStat(0, 'no answers')
          : definedStat(mean(points), n > 1 ? sampleStandardDeviation(points) / Math.sqrt(n) : null, n),
      meanAbsolutePoints: n === 0 ? null : mean(points.map(Math.abs)),
      offByHalfPoint: proportionStat(
        count((d) => Math.abs(d) >= 1),
        n,
      ),
      offByOnePoint: proportionStat(
        count((d) => Math.abs(d) >= 2),
        n,
      ),
    });
  }
  return out;
}

export interface SideSkills {
  answers: number;
  /** Skill → how many on this side ticked it, most ticked first (then alphabetical). */
  skills: { skill: string; n: number }[];
}

export interface CaseSpreadResult {
  caseId: number;
  reference: number;
  answers: number;
  /** Each class answered (half points, ascending) with its count. */
  counts: { sportClass: number; n: number }[];
  lowest: number | null;
  highest: number | null;
  rangePoints: number | null;
  exactShare: number | null;
  split: boolean;
  /** Lower class (half points) of the boundary that divides the answers best; null when no split. */
  boundary: number | null;
  lower: SideSkills | null;
  upper: SideSkills | null;
}

function sideOf(list: readonly ScoredAnswer[]): SideSkills {
  const tally = new Map<string, number>();
  for (const a of list) for (const s of new Set(a.skills)) tally.set(s, (tally.get(s) ?? 0) + 1);
  const skills = [...tally.entries()]
    .map(([skill, n]) => ({ skill, n }))
    .sort((x, y) => y.n - x.n || (x.skill < y.skill ? -1 : x.skill > y.skill ? 1 : 0));
  return { answers: list.length, skills };
}

/** The spread of the answers of each case, in the order of `cases`. */
export function caseSpreads(cases: readonly ScoredCase[], answers: readonly ScoredAnswer[]): CaseSpreadResult[] {
  return cases.map((c) => {
    const list = answers.filter((a) => a.caseId === c.id);
    const tally = new Map<number, number>();
    for (const a of list) tally.set(a.sportClass, (tally.get(a.sportClass) ?? 0) + 1);
    const counts = [...tally.entries()].map(([sportClass, n]) => ({ sportClass, n })).sort((x, y) => x.sportClass - y.sportClass);
    const n = list.length;
    if (n === 0) {
      return {
        caseId: c.id,
        reference: c.reference,
        answers: 0,
        counts,
        lowest: null,
        highest: null,
        rangePoints: null,
        exactShare: null,
        split: false,
        boundary: null,
        lower: null,
        upper: null,
      };
    }
    const lowest = counts[0].sportClass;
    const highest = counts[counts.length - 1].sportClass;
    const exactShare = (tally.get(c.reference) ?? 0) / n;
    const split = highest > lowest;
    let boundary: number | null = null;
    if (split) {
      let best = -1;
      for (let b = lowest; b < highest; b++) {
        const below = list.filter((a) => a.sportClass <= b).length;
        const smaller = Math.min(below, n - below);
        const distance = Math.abs(b + 0.5 - c.reference);
        const bestDistance = boundary === null ? Infinity : Math.abs(boundary + 0.5 - c.reference);
        if (smaller > best || (smaller === best && distance < bestDistance)) {
          best = smaller;
          boundary = b;
        }
      }
    }
    return {
      caseId: c.id,
      reference: c.reference,
      answers: n,
      counts,
      lowest,
      highest,
      rangePoints: (highest - lowest) / 2,
      exactShare,
      split,
      boundary,
      lower: boundary === null ? null : sideOf(list.filter((a) => a.sportClass <= boundary)),
      upper: boundary === null ? null : sideOf(list.filter((a) => a.sportClass > boundary)),
    };
  });
}
