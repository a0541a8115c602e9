/**
 * The sport class scale.
 *
 * Wheelchair basketball classes run from 1.0 to 4.5 in half-point steps: eight classes
 * (a fact of the trade). Some national leagues add a class above 4.5 for players without an
 * eligible impairment (common practice in some countries; from memory), so the scale is a
 * per-federation setting whose default is the eight classes.
 *
 * Classes are stored and compared as integers of half points (1.0 → 2, 4.5 → 9) so that no
 * float comparison ever decides agreement.
 */

/** A sport class in half points: 2 = 1.0, 3 = 1.5, … 9 = 4.5. Always an integer. */
export type HalfPoints = number;

export interface ClassScale {
  /** Lowest class in half points (inclusive). */
  readonly min: HalfPoints;
  /** Highest class in half points (inclusive). */
  readonly max: HalfPoints;
}

export const DEFAULT_SCALE: ClassScale = Object.freeze({ min: 2, max: 9 });

/** Number of classes on the scale (8 for the default). */
export function classCount(scale: ClassScale = DEFAULT_SCALE): number {
  return scale.max - scale.min + 1;
}

/** Every class of the scale in half points, ascending. */
export function scaleClasses(scale: ClassScale = DEFAULT_SCALE): HalfPoints[] {
  const out: HalfPoints[] = [];
  for (let h = scale.min; h <= scale.max; h++) out.push(h);
  return out;
}

/** Zero-based index of a class on the scale (1.0 → 0 on the default scale). */
export function classIndex(halfPoints: HalfPoints, scale: ClassScale = DEFAULT_SCALE): number {
  return halfPoints - scale.min;
}

/** The class written as people write it: 3 → "1.5", 8 → "4.0". */
export function formatClass(halfPoints: HalfPoints): string {
  return (halfPoints / 2).toFixed(1);
}

export function isOnScale(halfPoints: number, scale: ClassScale = DEFAULT_SCALE): boolean {
  return Number.isInteger(halfPoints) && halfPoints >= scale.min && halfPoints <= scale.max;
}

export type ParseClassResult = { ok: true; value: HalfPoints } | { ok: false; reason: string };

const CLASS_TEXT = /^\s*(\d{1,2})(?:[.,](\d{1,3}))?\s*$/;

/**
 * Reads a sport class as written in a spreadsheet: "3", "3.0", "3,5" and " 3.5 " are accepted;
 * 3.25, blanks, text and classes off the federation's scale are refused with a reason.
 */
export function parseSportClass(text: string | number | null | undefined, scale: ClassScale = DEFAULT_SCALE): ParseClassResult {
  if (text === null || text === undefined) return { ok: false, reason: 'is blank' };
  const raw = typeof text === 'number' ? String(text) : text;
  if (raw.trim() === '') return { ok: false, reason: 'is blank' };
  const m = CLASS_TEXT.exec(raw);
  if (!m) return { ok: false, reason: 'is not a number' };
  const whole = Number(m[1]);
  const fraction = (m[2] ?? '0').replace(/0+$/, '');
  let half: number;
  if (fraction === '') half = whole * 2;
  else if (fraction === '5') half = whole * 2 + 1;
  else return { ok: false, reason: 'is not a half-point class' };
  if (!isOnScale(half, scale)) {
    return { ok: false, reason: `is off the scale ${formatClass(scale.min)}–${formatClass(scale.max)}` };
  }
  return { ok: true, value: half };
}
