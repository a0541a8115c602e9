import crypto from 'node:crypto';
import Papa from 'papaparse';
import { neutraliseCell } from '../../shared/csv-safe';
import { formatClass, scaleClasses, type ClassScale, type HalfPoints } from '../../shared/scale';
import type { ExportCounts, ExportField, ExportFile, ExportRequest } from '../../shared/schemas/exports';
import { DATE_MODE_LABELS } from '../../shared/schemas/exports';
import { PSEUDONYM_ALPHABET, PSEUDONYM_BITS, PSEUDONYM_PREFIXES, pseudonymiser } from './pseudonyms';
import { suppressSmallCells, type SuppressibleAssessment } from './suppression';
import { ASSESSMENT_KINDS, type AssessmentKind } from '../../shared/schemas/common';

export const EXPORT_FORMAT = 'panelwise.research-export/1';
export const DICTIONARY_FORMAT = 'panelwise.research-export-dictionary/1';

/** One rating as read from the database for an export (with identities: server-side only). */
export interface SourceRating {
  assessmentKey: string;
  athleteKey: string;
  eventKey: string | null;
  classifierKey: string;
  /** ISO date YYYY-MM-DD. */
  assessedOn: string;
  kind: AssessmentKind;
  category: string;
  eventLevel: string | null;
  sportClass: HalfPoints;
  panelClass: HalfPoints | null;
}

export interface BuildInput {
  federation: { name: string; scale: ClassScale };
  exportId: number;
  /** ISO timestamp of the export; only its month is written. */
  exportedAt: string;
  request: ExportRequest;
  k: number;
  key: Uint8Array;
  salt: string;
  study: { name: string } | null;
  ratings: readonly SourceRating[];
}

export interface BuiltExport {
  csv: string;
  json: string;
  dictionary: string;
  counts: ExportCounts;
  fileNames: Record<ExportFile, string>;
}

export type ColumnType = 'string' | 'integer' | 'number' | 'month';

export interface ColumnSpec {
  name: string;
  type: ColumnType;
  nullable: boolean;
  description: string;
  values?: string[];
  pattern?: string;
}

type Cell = string | number | null;

/** Season of an ISO date: 1 July to 30 June, written "2023-24". */
export function seasonOf(isoDate: string): string {
  const year = Number(isoDate.slice(0, 4));
  const month = Number(isoDate.slice(5, 7));
  const start = month >= 7 ? year : year - 1;
  return `${start}-${String(start + 1).slice(2)}`;
}

const DAY_MS = 86_400_000;
const dayNumber = (iso: string) => Math.round(Date.parse(`${iso}T00:00:00Z`) / DAY_MS);

const pseudonymPattern = (prefix: string) => `^${prefix}[${PSEUDONYM_ALPHABET}]{${PSEUDONYM_BITS / 4}}$`;

interface Draft extends SuppressibleAssessment {
  pseudonym: string;
  athletePseudonym: string;
  panelClass: HalfPoints | null;
  ratings: { classifier: string; sportClass: HalfPoints }[];
}

export const CAUTIONS = [
  'Agreement statistics describe how consistently classifiers rate, not whether any athlete’s sport class is correct.',
  'Decisions about an athlete’s class belong to the federation’s rules and its licensed classifiers; this data cannot confirm, question or change any athlete’s class.',
  'Do not try to re-identify athletes, classifiers or events, and do not link this data with other sources except other exports of the same study.',
];

/**
 * A 32-bit fingerprint (FNV-1a) of everything the database holds about each assessment that an
 * export could write: kind, date, event, event level, the athlete's category, the panel's class
 * and every rating with its classifier. Two exports hold "the same" assessment when both have
 * it with equal fingerprints (server/exports/differencing.ts).
 */
export function assessmentFingerprints(ratings: readonly SourceRating[]): Map<string, number> {
  const parts = new Map<string, string[]>();
  for (const r of ratings) {
    let list = parts.get(r.assessmentKey);
    if (!list)
      parts.set(
        r.assessmentKey,
        (list = [r.athleteKey, r.kind, r.assessedOn, r.eventKey ?? '', r.eventLevel ?? '', r.category, String(r.panelClass ?? '')]),
      );
    list.push(`${r.classifierKey}=${r.sportClass}`);
  }
  const out = new Map<string, number>();
  for (const [key, list] of parts) {
    const head = list.slice(0, 7);
    const ratingsPart = list.slice(7).sort();
    const text = [...head, ...ratingsPart].join('\u241f');
    let h = 0x811c9dc5;
    for (let i = 0; i < text.length; i++) {
      h ^= text.charCodeAt(i);
      h = Math.imul(h, 0x01000193);
    }
    out.set(key, h | 0);
  }
  return out;
}

/** Renders the CSV, the JSON and the data dictionary of an export (pure apart from hashing). */
export function renderExport(input: BuildInput): BuiltExport {
  const { request, k, federation } = input;
  const fields = new Set<ExportField>(request.fields);
  const pseudo = pseudonymiser(input.key, input.salt);

  // Assessments, in the order met; day offsets from each athlete's first assessment in the export.
  const byAssessment = new Map<string, Draft>();
  const firstDay = new Map<string, number>();
  for (const r of input.ratings) {
    const d = dayNumber(r.assessedOn);
    const first = firstDay.get(r.athleteKey);
    if (first === undefined || d < first) firstDay.set(r.athleteKey, d);
  }
  for (const r of input.ratings) {
    let draft = byAssessment.get(r.assessmentKey);
    if (!draft) {
      const attributes: Record<string, Cell> = {};
      if (fields.has('kind')) attributes.kind = r.kind;
      if (fields.has('season')) attributes.season = seasonOf(r.assessedOn);
      if (fields.has('event')) attributes.event = r.eventKey === null ? null : pseudo('event', r.eventKey);
      if (fields.has('event_level')) attributes.event_level = r.eventLevel;
      if (fields.has('date')) {
        attributes.date = request.dateMode === 'month' ? r.assessedOn.slice(0, 7) : dayNumber(r.assessedOn) - firstDay.get(r.athleteKey)!;
      }
      draft = {
        athlete: r.athleteKey,
        rows: 0,
        category: r.category,
        attributes,
        suppressed: false,
        pseudonym: pseudo('assessment', r.assessmentKey),
        athletePseudonym: pseudo('athlete', r.athleteKey),
        panelClass: r.panelClass,
        ratings: [],
      };
      byAssessment.set(r.assessmentKey, draft);
    }
    draft.rows++;
    draft.ratings.push({ classifier: pseudo('classifier', r.classifierKey), sportClass: r.sportClass });
  }
  const drafts = [...byAssessment.values()];
  const combinationAttributes = Object.keys(drafts[0]?.attributes ?? {}).filter((a) => a !== 'date' || request.dateMode === 'month');
  const suppressed = suppressSmallCells(drafts, { k, categoryExported: fields.has('category'), combinationAttributes });

  // Columns, in a fixed order.
  const classValues = scaleClasses(federation.scale).map(formatClass);
  const columns: ColumnSpec[] = [
    {
      name: 'assessment',
      type: 'string',
      nullable: false,
      pattern: pseudonymPattern(PSEUDONYM_PREFIXES.assessment),
      description: 'Pseudonym of the assessment (one panel’s decision about one athlete on one occasion).',
    },
  ];
  if (fields.has('athlete'))
    columns.push({
      name: 'athlete',
      type: 'string',
      nullable: false,
      pattern: pseudonymPattern(PSEUDONYM_PREFIXES.athlete),
      description: 'Pseudonym of the athlete.',
    });
  columns.push({
    name: 'classifier',
    type: 'string',
    nullable: false,
    pattern: pseudonymPattern(PSEUDONYM_PREFIXES.classifier),
    description: 'Pseudonym of the classifier who gave this rating.',
  });
  columns.push({
    name: 'sport_class',
    type: 'number',
    nullable: false,
    values: classValues,
    description: 'The sport class this classifier gave, in points with one decimal (see classScale).',
  });
  if (fields.has('panel_class'))
    columns.push({
      name: 'panel_class',
      type: 'number',
      nullable: true,
      values: classValues,
      description: 'The panel’s final sport class for the assessment, in points; empty when not recorded.',
    });
  if (fields.has('kind'))
    columns.push({
      name: 'kind',
      type: 'string',
      nullable: true,
      values: [...ASSESSMENT_KINDS],
      description: 'first classification, review or protest; empty when suppressed.',
    });
  if (fields.has('season'))
    columns.push({
      name: 'season',
      type: 'string',
      nullable: true,
      pattern: '^\\d{4}-\\d{2}$',
      description: 'Season of the assessment, 1 July to 30 June, written 2023-24; empty when suppressed.',
    });
  if (fields.has('event'))
    columns.push({
      name: 'event',
      type: 'string',
      nullable: true,
      pattern: pseudonymPattern(PSEUDONYM_PREFIXES.event),
      description: 'Pseudonym of the event; empty when the assessment had no event or was suppressed.',
    });
  if (fields.has('event_level'))
    columns.push({
      name: 'event_level',
      type: 'string',
      nullable: true,
      description:
        'Level of the event as the federation records it (for example national, championship); empty when suppressed or without event.',
    });
  if (fields.has('category'))
    columns.push({
      name: 'category',
      type: 'string',
      nullable: true,
      description: 'The athlete’s competition category (for example men, women, junior); empty when suppressed.',
    });
  if (fields.has('date')) {
    columns.push(
      request.dateMode === 'month'
        ? {
            name: 'assessed_month',
            type: 'month',
            nullable: true,
            pattern: '^\\d{4}-\\d{2}$',
            description: 'Month of the assessment (ISO 8601 year-month, YYYY-MM); empty when suppressed.',
          }
        : {
            name: 'day_offset',
            type: 'integer',
            nullable: true,
            description: 'Days from the athlete’s first assessment in this export (0 = that assessment); empty when suppressed.',
          },
    );
  }

  // Rows in pseudonym order: no order of the database (and so no chronology) shows through.
  drafts.sort((a, b) => (a.pseudonym < b.pseudonym ? -1 : a.pseudonym > b.pseudonym ? 1 : 0));
  const records: Record<string, Cell>[] = [];
  for (const d of drafts) {
    d.ratings.sort((a, b) => (a.classifier < b.classifier ? -1 : a.classifier > b.classifier ? 1 : 0));
    for (const rating of d.ratings) {
      const row: Record<string, Cell> = { assessment: d.pseudonym };
      if (fields.has('athlete')) row.athlete = d.athletePseudonym;
      row.classifier = rating.classifier;
      row.sport_class = rating.sportClass / 2;
      if (fields.has('panel_class')) row.panel_class = d.panelClass === null ? null : d.panelClass / 2;
      if (fields.has('kind')) row.kind = d.attributes.kind ?? null;
      if (fields.has('season')) row.season = d.attributes.season ?? null;
      if (fields.has('event')) row.event = d.attributes.event ?? null;
      if (fields.has('event_level')) row.event_level = d.attributes.event_level ?? null;
      if (fields.has('category')) row.category = d.category;
      if (fields.has('date')) row[request.dateMode === 'month' ? 'assessed_month' : 'day_offset'] = d.attributes.date ?? null;
      records.push(row);
    }
  }

  const csvCell = (column: ColumnSpec, value: Cell): string => {
    if (value === null) return '';
    if (column.type === 'number') return (value as number).toFixed(1);
    if (typeof value === 'number') return String(value);
    return String(neutraliseCell(value));
  };
  const csv =
    Papa.unparse(
      { fields: columns.map((c) => c.name), data: records.map((row) => columns.map((c) => csvCell(c, row[c.name] ?? null))) },
      { newline: '\r\n', quotes: false },
    ) + '\r\n';

  const base = `research-export-${input.exportId}`;
  const fileNames: Record<ExportFile, string> = { csv: `${base}.csv`, json: `${base}.json`, dictionary: `${base}-dictionary.json` };
  const json =
    JSON.stringify(
      {
        format: EXPORT_FORMAT,
        export: input.exportId,
        dictionary: fileNames.dictionary,
        columns: columns.map((c) => c.name),
        rows: records,
      },
      null,
      1,
    ) + '\n';

  const athletes = new Set(drafts.map((d) => d.athlete)).size;
  const classifiers = new Set(records.map((r) => r.classifier)).size;
  const counts: ExportCounts = { rows: records.length, assessments: drafts.length, athletes, classifiers, suppressed };
  const exportedMonth = input.exportedAt.slice(0, 7);
  const sha256 = (text: string) => crypto.createHash('sha256').update(text, 'utf8').digest('hex');

  const dictionary = {
    format: DICTIONARY_FORMAT,
    title: `Anonymised classification panel decisions, research export ${input.exportId}`,
    publisher: federation.name,
    exportedMonth,
    files: {
      csv: {
        name: fileNames.csv,
        mediaType: 'text/csv',
        encoding: 'UTF-8 (no byte-order mark)',
        delimiter: ',',
        newline: 'CRLF',
        header: true,
        sha256: sha256(csv),
      },
      json: {
        name: fileNames.json,
        mediaType: 'application/json',
        encoding: 'UTF-8',
        layout: '{format, export, dictionary, columns, rows: [one object per rating, keyed by column name; empty cells are null]}',
        sha256: sha256(json),
      },
    },
    unitOfObservation:
      'One row per rating: one classifier’s sport class for one assessment. The ratings of an assessment share its pseudonym.',
    scope: {
      seasons: [...request.scope.seasons].sort(),
      eventLevels: [...request.scope.eventLevels].sort(),
      individualEventsChosen: request.scope.eventIds?.length ?? 0,
      categories: [...request.scope.categories].sort(),
      kinds: [...request.scope.kinds],
    },
    counts: { rows: counts.rows, assessments: counts.assessments, athletes: counts.athletes, classifiers: counts.classifiers },
    columns,
    classScale: {
      classes: classValues,
      min: formatClass(federation.scale.min),
      max: formatClass(federation.scale.max),
      step: 0.5,
      note: 'Sport classes in points, half-point steps. Agreement between two ratings is equality of classes; compare them as whole numbers of half points (class × 2), never as floating-point numbers.',
    },
    pseudonyms: {
      method: `Each athlete, classifier, event and assessment is replaced by a keyed pseudonym: a prefix (${Object.values(PSEUDONYM_PREFIXES).join(', ')}) followed by the first ${PSEUDONYM_BITS} bits of HMAC-SHA-256(federation key, entity, salt, the federation’s own identifier), written 4 bits a letter in the alphabet "${PSEUDONYM_ALPHABET}". The key is the federation’s and never leaves its server.`,
      salt: input.study
        ? `The stable salt of the study "${input.study.name}": pseudonyms are the same in every export of this study, so those exports can be joined.`
        : 'A fresh salt drawn for this export alone and not kept: its pseudonyms cannot be joined with any other export, nor traced back by anyone.',
      study: input.study?.name ?? null,
    },
    dates: {
      mode: request.dateMode,
      description:
        request.dateMode === 'month'
          ? `${DATE_MODE_LABELS.month}. Exact days are never exported. Seasons run from 1 July to 30 June.`
          : `${DATE_MODE_LABELS.offset}: whole days between the assessment and the same athlete’s earliest assessment in this export. No calendar date is exported. Seasons run from 1 July to 30 June.`,
    },
    neverExported: [
      'names of athletes, classifiers and events',
      'the federation’s codes of athletes, classifiers and events',
      'assessment identifiers',
      'exact dates',
      'free-text notes',
    ],
    suppression: {
      k,
      rule: [
        `Rows are never dropped, so every agreement statistic recomputed from this export equals the one computed from the federation’s database for the same scope.`,
        `1. A competition category held by fewer than ${k} athletes of this export is blanked on every row of those athletes.`,
        `2. Each assessment’s combination of the exported attributes (category after step 1, season, event, event level, kind${request.dateMode === 'month' ? ', month' : ''}) is counted in distinct athletes; when fewer than ${k} athletes hold it, the assessment’s season, event, event level, kind and date are blanked on all of its rows.`,
        'Day offsets are relative to each athlete and are not part of the combination; they are blanked with the rest of a suppressed assessment.',
      ],
      counts: suppressed,
    },
    csvSafety:
      'A text cell that begins with =, +, -, @, a tab or a carriage return is written to the CSV with a leading apostrophe so that spreadsheets do not run it as a formula; the JSON holds the text unchanged.',
    cautions: CAUTIONS,
    howToCite: `${federation.name} (${exportedMonth.slice(0, 4)}). Anonymised classification panel decisions, research export ${input.exportId}${input.study ? `, study "${input.study.name}"` : ''} [data set, exported ${exportedMonth}]. Made with Panelwise.`,
  };
  return { csv, json, dictionary: JSON.stringify(dictionary, null, 1) + '\n', counts, fileNames };
}
