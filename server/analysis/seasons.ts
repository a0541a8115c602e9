/**
 * Seasons and the class distribution by season.
 *
 * A season is a sporting year. The demo's federation plays September to June; so that every
 * date belongs to exactly one season, season Y runs from 1 July Y to 30 June Y+1 (the month it
 * starts is a parameter) and is labelled "Y–(Y+1)" in short form, e.g. "2024–25".
 *
 * The class distribution counts, per season, the outcome class of each assessment (the panel's
 * recorded final class, else the panel median when it is a class: `assessmentOutcomes`), with
 * each class's share of the season's assessments with an outcome.
 */
import { assessmentOutcomes } from './class-transitions';
import { classLabel, isoDateToDay, type RatingSet } from './rating-set';

const DAY_MS = 86_400_000;

/** First month (1 = January) of a season; July by default. */
export const SEASON_START_MONTH = 7;

/** The starting year of the season a day belongs to. */
export function dayToSeasonYear(day: number, startMonth = SEASON_START_MONTH): number {
  const d = new Date(day * DAY_MS);
  return d.getUTCMonth() + 1 >= startMonth ? d.getUTCFullYear() : d.getUTCFullYear() - 1;
}

/** Label of the season starting in `year`, e.g. 2024 → "2024–25". */
export function seasonLabel(year: number): string {
  return `${year}–${String((year + 1) % 100).padStart(2, '0')}`;
}

/** First and last day (ISO dates, inclusive) of the season starting in `year`. */
export function seasonRange(year: number, startMonth = SEASON_START_MONTH): { from: string; to: string } {
  const from = new Date(Date.UTC(year, startMonth - 1, 1));
  const to = new Date(Date.UTC(year + 1, startMonth - 1, 1) - DAY_MS);
  return { from: from.toISOString().slice(0, 10), to: to.toISOString().slice(0, 10) };
}

/** Season starting year of an ISO date, or null if it is not a date. */
export function isoDateToSeasonYear(iso: string, startMonth = SEASON_START_MONTH): number | null {
  const day = isoDateToDay(iso);
  return day === null ? null : dayToSeasonYear(day, startMonth);
}

export interface SeasonDistribution {
  season: string;
  year: number;
  /** Assessments in the season with an outcome class. */
  n: number;
  /** Count per class label ("1.0" … "4.5"). */
  counts: Record<string, number>;
  /** Share per class label (null when n = 0). */
  shares: Record<string, number | null>;
}

/** Outcome classes by season, seasons in ascending order. */
export function classDistributionBySeason(set: RatingSet, startMonth = SEASON_START_MONTH): SeasonDistribution[] {
  const outcome = assessmentOutcomes(set);
  const q = set.q;
  const bySeason = new Map<number, Float64Array>();
  for (let a = 0; a < set.assessmentCount; a++) {
    const o = outcome[a];
    if (o < 0) continue;
    const y = dayToSeasonYear(set.day[a], startMonth);
    let counts = bySeason.get(y);
    if (!counts) bySeason.set(y, (counts = new Float64Array(q)));
    counts[o]++;
  }
  const labels = Array.from({ length: q }, (_, i) => classLabel(set, i));
  return [...bySeason.entries()]
    .sort(([x], [y]) => x - y)
    .map(([year, counts]) => {
      let n = 0;
      for (let i = 0; i < q; i++) n += counts[i];
      return {
        season: seasonLabel(year),
        year,
        n,
        counts: Object.fromEntries(labels.map((l, i) => [l, counts[i]])),
        shares: Object.fromEntries(labels.map((l, i) => [l, n > 0 ? counts[i] / n : null])),
      };
    });
}
