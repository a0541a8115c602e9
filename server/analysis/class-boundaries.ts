/**
 * Class boundaries: for each pair of adjacent classes (1.0/1.5 … 4.0/4.5), how often a panel
 * split across the boundary, i.e. had ratings in both classes, as a share of the assessments
 * (with ≥ 2 ratings) whose ratings touched either class. Wilson (1927) interval.
 */
import type { CountTable } from './count-table';
import { proportionStat, type StatResult } from './result';
import { formatClass, type ClassScale } from '../../shared/scale';

export interface BoundarySplit extends StatResult {
  /** Lower class, e.g. "2.5". */
  lower: string;
  /** Upper class, e.g. "3.0". */
  upper: string;
  /** Share of the assessments touching either class whose panel split across the boundary. */
  splitRate: number | null;
  /** Assessments split across the boundary. */
  splits: number;
}

export function classBoundaries(t: CountTable, scale: ClassScale): BoundarySplit[] {
  const { q, rows, counts, totals, weights } = t;
  const touched = new Float64Array(q);
  const split = new Float64Array(q);
  for (let i = 0; i < rows; i++) {
    if (totals[i] < 2) continue;
    const w = weights[i];
    const off = i * q;
    for (let j = 0; j + 1 < q; j++) {
      const lo = counts[off + j];
      const hi = counts[off + j + 1];
      if (lo > 0 || hi > 0) touched[j] += w;
      if (lo > 0 && hi > 0) split[j] += w;
    }
  }
  const out: BoundarySplit[] = [];
  for (let j = 0; j + 1 < q; j++) {
    const s = proportionStat(split[j], touched[j]);
    out.push({ ...s, lower: formatClass(scale.min + j), upper: formatClass(scale.min + j + 1), splitRate: s.value, splits: split[j] });
  }
  return out;
}
