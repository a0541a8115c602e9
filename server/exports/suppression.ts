import type { SuppressionCounts } from '../../shared/schemas/exports';

/**
 * Small-cell suppression for research exports (k-anonymity over athletes, by blanking).
 *
 * Rows are never dropped: every rating stays with its assessment, classifier, athlete and class,
 * so every agreement statistic recomputed from an export equals the one computed from the
 * database for the same scope. Instead, attributes are blanked:
 *
 * 1. Category cells. A competition category held by fewer than k athletes of the export has its
 *    value blanked on every row of those athletes (the category is an athlete's attribute, so it
 *    is blanked for the athlete as a whole and cannot be read back from another row).
 * 2. Combination cells. Each assessment's combination of the exported attributes (category after
 *    step 1, season, event, event level, kind and, when dates are months, the month) is counted
 *    in distinct athletes; an assessment whose combination is held by fewer than k athletes has
 *    all of its assessment-level attributes blanked (season, event pseudonym, event level, kind,
 *    date or day offset) on all of its rows. The event pseudonym is blanked too, because other
 *    rows of the same event would otherwise give its season, level and month back.
 *
 * Day offsets are relative to each athlete's own first assessment, so they are not counted as a
 * combination attribute; they are still blanked on a suppressed assessment.
 */

export interface SuppressibleAssessment {
  /** A stable key of the athlete (for counting distinct athletes). */
  athlete: string;
  /** Rows (ratings) the assessment contributes. */
  rows: number;
  category: string | null;
  /** Exported assessment-level attributes; null when blank. Blanked together on suppression. */
  attributes: Record<string, string | number | null>;
  suppressed: boolean;
}

export interface SuppressionOptions {
  k: number;
  /** Whether the category column is exported (step 1 only applies then). */
  categoryExported: boolean;
  /** The names in `attributes` that form the combination (the rest are only blanked). */
  combinationAttributes: readonly string[];
}

export function suppressSmallCells(items: SuppressibleAssessment[], options: SuppressionOptions): SuppressionCounts {
  const counts: SuppressionCounts = { categoryAthletes: 0, categoryRows: 0, combinationAssessments: 0, combinationRows: 0 };
  const { k } = options;

  if (options.categoryExported) {
    const athletesByCategory = new Map<string, Set<string>>();
    for (const item of items) {
      if (item.category === null) continue;
      let set = athletesByCategory.get(item.category);
      if (!set) athletesByCategory.set(item.category, (set = new Set()));
      set.add(item.athlete);
    }
    const small = new Set<string>();
    for (const [category, athletes] of athletesByCategory) {
      if (athletes.size < k) {
        small.add(category);
        counts.categoryAthletes += athletes.size;
      }
    }
    for (const item of items) {
      if (item.category !== null && small.has(item.category)) {
        item.category = null;
        counts.categoryRows += item.rows;
      }
    }
  }

  if (options.combinationAttributes.length > 0) {
    const keyOf = (item: SuppressibleAssessment) =>
      JSON.stringify([
        options.categoryExported ? item.category : null,
        ...options.combinationAttributes.map((name) => item.attributes[name] ?? null),
      ]);
    const athletesByKey = new Map<string, Set<string>>();
    for (const item of items) {
      const key = keyOf(item);
      let set = athletesByKey.get(key);
      if (!set) athletesByKey.set(key, (set = new Set()));
      set.add(item.athlete);
    }
    for (const item of items) {
      if (athletesByKey.get(keyOf(item))!.size < k) {
        for (const name of Object.keys(item.attributes)) item.attributes[name] = null;
        item.suppressed = true;
        counts.combinationAssessments++;
        counts.combinationRows += item.rows;
      }
    }
  }
  return counts;
}
