/**
 * Where one classifier splits from the panel: for each pair of adjacent classes (1.0/1.5 …
 * 4.0/4.5), over the classifier's ratings where the classifier's class or the panel's final
 * class is one of the two, the share where the two sit on opposite sides of the boundary
 * (classifier in one class, panel in the other). Read from the classifier's confusion matrix
 * against the panel's final class (`confusionWithPanel`). Wilson (1927) interval.
 */
import type { ConfusionMatrix } from './confusion-matrix';
import { proportionStat, type StatResult } from './result';

export interface ClassifierBoundarySplit extends StatResult {
  lower: string;
  upper: string;
  /** Ratings touching either class (classifier's or panel's). */
  touching: number;
  /** Classifier in the upper class, panel in the lower. */
  above: number;
  /** Classifier in the lower class, panel in the upper. */
  below: number;
  splitRate: number | null;
}

export function classifierBoundarySplits(m: ConfusionMatrix): ClassifierBoundarySplit[] {
  const q = m.classes.length;
  const out: ClassifierBoundarySplit[] = [];
  for (let j = 0; j + 1 < q; j++) {
    let touching = 0;
    for (let r = 0; r < q; r++) {
      for (let c = 0; c < q; c++) {
        if (r === j || r === j + 1 || c === j || c === j + 1) touching += m.counts[r][c];
      }
    }
    const above = m.counts[j + 1][j];
    const below = m.counts[j][j + 1];
    const s = proportionStat(above + below, touching);
    out.push({ ...s, lower: m.classes[j], upper: m.classes[j + 1], touching, above, below, splitRate: s.value });
  }
  return out;
}
