/**
 * The columns an import file may have, and the guess of which file column is which.
 *
 * Two layouts:
 * - long: one row per rating (assessment_id, athlete_code, event_code, assessed_on,
 *   classifier_code, sport_class, optional panel_class, kind, note);
 * - wide: one row per assessment, with either one column per classifier code (the cell is that
 *   classifier's sport class, blank when they were not on the panel) or one pair of columns per
 *   panel seat (the seat's classifier code and its sport class).
 *
 * A mapping says, for each header of the file, which target it feeds (or "ignore"). Client and
 * server share this file: the client guesses and shows the mapping, the server applies it.
 */
import { ASSESSMENT_KINDS_LIST } from './schemas/common';

export const IMPORT_LAYOUTS = ['long', 'wide'] as const;
export type ImportLayout = (typeof IMPORT_LAYOUTS)[number];

/** Columns describing the assessment, in both layouts. */
export const ASSESSMENT_COLUMNS = ['assessment_id', 'athlete_code', 'event_code', 'assessed_on', 'panel_class', 'kind', 'note'] as const;
/** Columns of one rating, in the long layout. */
export const RATING_COLUMNS = ['classifier_code', 'sport_class'] as const;

export const REQUIRED_ASSESSMENT_COLUMNS = ['assessment_id', 'athlete_code', 'event_code', 'assessed_on'] as const;
export const REQUIRED_LONG_COLUMNS = [...REQUIRED_ASSESSMENT_COLUMNS, 'classifier_code', 'sport_class'] as const;

export type FixedTarget = (typeof ASSESSMENT_COLUMNS)[number] | (typeof RATING_COLUMNS)[number];

/**
 * What a file column feeds: a fixed column, "ignore", a classifier's column in the wide layout
 * (`classifier:C05`) or a panel seat's classifier or class (`seat1_classifier`, `seat1_class`).
 */
export type ColumnTarget = FixedTarget | 'ignore' | `classifier:${string}` | `seat${number}_classifier` | `seat${number}_class`;

export const MAX_SEATS = 5;

/** Keys of a mapping are headers as written in the file, trimmed; values are targets. */
export type ColumnMapping = Record<string, ColumnTarget>;

export const DATE_FORMATS = ['iso', 'DD/MM/YYYY', 'MM/DD/YYYY', 'DD.MM.YYYY', 'YYYY/MM/DD'] as const;
export type DateFormat = (typeof DATE_FORMATS)[number];

export const DATE_FORMAT_LABELS: Record<DateFormat, string> = {
  iso: 'ISO 8601 (2024-03-09)',
  'DD/MM/YYYY': 'Day/month/year (09/03/2024)',
  'MM/DD/YYYY': 'Month/day/year (03/09/2024)',
  'DD.MM.YYYY': 'Day.month.year (09.03.2024)',
  'YYYY/MM/DD': 'Year/month/day (2024/03/09)',
};

const FIXED: readonly FixedTarget[] = [...ASSESSMENT_COLUMNS, ...RATING_COLUMNS];

export function isColumnTarget(value: string): value is ColumnTarget {
  if (value === 'ignore' || (FIXED as readonly string[]).includes(value)) return true;
  if (/^classifier:\S{1,64}$/.test(value)) return true;
  const seat = /^seat(\d+)_(classifier|class)$/.exec(value);
  return seat !== null && Number(seat[1]) >= 1 && Number(seat[1]) <= MAX_SEATS;
}

/** Words people read for a target. */
export function targetLabel(target: ColumnTarget): string {
  if (target === 'ignore') return 'Ignore this column';
  if (target.startsWith('classifier:')) return `Sport class given by ${target.slice('classifier:'.length)}`;
  const seat = /^seat(\d+)_(classifier|class)$/.exec(target);
  if (seat) return seat[2] === 'classifier' ? `Panel seat ${seat[1]}: classifier code` : `Panel seat ${seat[1]}: sport class`;
  return FIXED_LABELS[target as FixedTarget];
}

export const FIXED_LABELS: Record<FixedTarget, string> = {
  assessment_id: 'Assessment id',
  athlete_code: 'Athlete code',
  event_code: 'Event code',
  assessed_on: 'Date of assessment',
  panel_class: "Panel's sport class",
  kind: `Kind (${ASSESSMENT_KINDS_LIST})`,
  note: 'Note',
  classifier_code: 'Classifier code',
  sport_class: 'Sport class',
};

/** Headers compared without case, spaces, dashes or underscores. */
export function normaliseHeader(header: string): string {
  return header
    .trim()
    .toLowerCase()
    .replace(/[\s_\-.]+/g, '');
}

const SYNONYMS: Record<string, FixedTarget> = {
  assessmentid: 'assessment_id',
  assessment: 'assessment_id',
  assessmentref: 'assessment_id',
  externalid: 'assessment_id',
  athletecode: 'athlete_code',
  athlete: 'athlete_code',
  athleteid: 'athlete_code',
  player: 'athlete_code',
  playercode: 'athlete_code',
  eventcode: 'event_code',
  event: 'event_code',
  eventid: 'event_code',
  tournament: 'event_code',
  assessedon: 'assessed_on',
  date: 'assessed_on',
  assessmentdate: 'assessed_on',
  classifiercode: 'classifier_code',
  classifier: 'classifier_code',
  classifierid: 'classifier_code',
  sportclass: 'sport_class',
  class: 'sport_class',
  rating: 'sport_class',
  panelclass: 'panel_class',
  finalclass: 'panel_class',
  kind: 'kind',
  type: 'kind',
  assessmentkind: 'kind',
  note: 'note',
  notes: 'note',
  comment: 'note',
};

/**
 * Guesses the target of each header. A header that looks like a classifier code (C05, CL12) is
 * a classifier's column; "classifier 1"/"class 1" pairs are panel seats. Anything else is left
 * out (the lead must choose, or ignore it).
 */
export function guessMapping(
  headers: readonly string[],
  knownClassifierCodes: readonly string[] = [],
): { layout: ImportLayout; mapping: ColumnMapping } {
  const mapping: ColumnMapping = {};
  const known = new Map(knownClassifierCodes.map((c) => [c.toLowerCase(), c]));
  for (const raw of headers) {
    const header = raw.trim();
    const n = normaliseHeader(header);
    const seatClassifier = /^(?:seat|panel|classifier|rater)(\d)(?:classifier|code)?$/.exec(n);
    const seatClass = /^(?:seat|panel)(\d)(?:class|sportclass|rating)$/.exec(n) ?? /^(?:class|sportclass|rating)(\d)$/.exec(n);
    if (SYNONYMS[n]) mapping[header] = SYNONYMS[n];
    else if (known.has(header.toLowerCase())) mapping[header] = `classifier:${known.get(header.toLowerCase())}`;
    else if (seatClassifier && Number(seatClassifier[1]) >= 1 && Number(seatClassifier[1]) <= MAX_SEATS)
      mapping[header] = `seat${Number(seatClassifier[1])}_classifier`;
    else if (seatClass && Number(seatClass[1]) >= 1 && Number(seatClass[1]) <= MAX_SEATS)
      mapping[header] = `seat${Number(seatClass[1])}_class`;
    else if (/^[a-z]{1,3}\d{1,4}$/i.test(header)) mapping[header] = `classifier:${header}`;
  }
  // Two headers guessed to the same fixed target: keep the first only.
  const seen = new Set<string>();
  for (const [header, target] of Object.entries(mapping)) {
    if (seen.has(target)) delete mapping[header];
    else seen.add(target);
  }
  return { layout: layoutOf(mapping), mapping };
}

/** The layout a mapping describes: wide when it has classifier or seat columns. */
export function layoutOf(mapping: ColumnMapping): ImportLayout {
  return Object.values(mapping).some((t) => t.startsWith('classifier:') || t.startsWith('seat')) ? 'wide' : 'long';
}

/** Targets a lead may pick for a header, for the given layout. */
export function targetChoices(layout: ImportLayout, header: string): ColumnTarget[] {
  const base: ColumnTarget[] = [...ASSESSMENT_COLUMNS];
  if (layout === 'long') return [...base, ...RATING_COLUMNS, 'ignore'];
  const seats: ColumnTarget[] = [];
  for (let s = 1; s <= MAX_SEATS; s++) seats.push(`seat${s}_classifier`, `seat${s}_class`);
  return [...base, `classifier:${header.trim()}`, ...seats, 'ignore'];
}
