/**
 * Confusion matrices (counts of class by class): a classifier against the panel's final class,
 * and one classifier against another on their shared assessments.
 */
import { pairTable, type PairTables } from './classifier-pairs';
import { classLabel, type RatingSet } from './rating-set';

export interface ConfusionMatrix {
  /** Class labels of rows and columns ("1.0" … "4.5"). */
  classes: string[];
  rowsAre: string;
  columnsAre: string;
  /** counts[row][column]. */
  counts: number[][];
  n: number;
}

function toMatrix(flat: ArrayLike<number>, q: number): { counts: number[][]; n: number } {
  const counts: number[][] = [];
  let n = 0;
  for (let i = 0; i < q; i++) {
    const row: number[] = [];
    for (let j = 0; j < q; j++) {
      row.push(flat[i * q + j]);
      n += flat[i * q + j];
    }
    counts.push(row);
  }
  return { counts, n };
}

/** Rows: the classifier's class; columns: the panel's recorded final class. */
export function confusionWithPanel(set: RatingSet, classifierCode: string): ConfusionMatrix {
  const q = set.q;
  const flat = new Int32Array(q * q);
  const ci = set.classifierCodes.indexOf(classifierCode);
  for (let p = 0; p < set.ratingCount; p++) {
    if (set.ratingClassifier[p] !== ci) continue;
    const fin = set.panelClass[set.ratingAssessment[p]];
    if (fin < 0) continue;
    flat[set.ratingClass[p] * q + fin]++;
  }
  const classes = Array.from({ length: q }, (_, i) => classLabel(set, i));
  return { classes, rowsAre: classifierCode, columnsAre: 'panel final class', ...toMatrix(flat, q) };
}

/** Rows: classifier a's class; columns: classifier b's class, on assessments both rated. */
export function confusionBetween(set: RatingSet, a: string, b: string, pt?: PairTables): ConfusionMatrix {
  const q = set.q;
  const ia = set.classifierCodes.indexOf(a);
  const ib = set.classifierCodes.indexOf(b);
  const classes = Array.from({ length: q }, (_, i) => classLabel(set, i));
  if (ia < 0 || ib < 0 || ia === ib) return { classes, rowsAre: a, columnsAre: b, ...toMatrix(new Int32Array(q * q), q) };
  if (pt) return { classes, rowsAre: a, columnsAre: b, ...toMatrix(pairTable(pt, ia, ib), q) };
  // One pair only: a direct pass over the assessments.
  const flat = new Int32Array(q * q);
  for (let s = 0; s < set.assessmentCount; s++) {
    let ca = -1;
    let cb = -1;
    for (let p = set.ratingStart[s]; p < set.ratingStart[s + 1]; p++) {
      if (set.ratingClassifier[p] === ia) ca = set.ratingClass[p]!;
      else if (set.ratingClassifier[p] === ib) cb = set.ratingClass[p]!;
    }
    if (ca >= 0 && cb >= 0) flat[ca * q + cb]++;
  }
  return { classes, rowsAre: a, columnsAre: b, ...toMatrix(flat, q) };
}
