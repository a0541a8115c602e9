import type { ColumnType, Generated } from 'kysely';
import type { Role } from '../../shared/schemas/common';
import type { AssessmentKind } from '../../shared/schemas/common';

/**
 * The database's tables, in one place. Classes are integers of half points (see shared/scale.ts);
 * dates are ISO 8601 text; JSON columns are text.
 */

type CreatedAt = ColumnType<string, string | undefined, never>;

export interface FederationTable {
  id: Generated<number>;
  slug: string;
  name: string;
  scale_min: ColumnType<number, number | undefined, number>;
  scale_max: ColumnType<number, number | undefined, number>;
  settings: ColumnType<string, string | undefined, string>;
  created_at: CreatedAt;
}

export interface UserTable {
  id: Generated<number>;
  email: string;
  display_name: string;
  password_hash: string | null;
  is_owner: ColumnType<number, number | undefined, number>;
  session_version: ColumnType<number, number | undefined, number>;
  created_at: CreatedAt;
}

/** The roles, defined once in shared/ (the zod schema of the API). */
export type { Role };

export interface MembershipTable {
  id: Generated<number>;
  user_id: number;
  federation_id: number;
  role: Role;
  active: ColumnType<number, number | undefined, number>;
  created_at: CreatedAt;
}

export interface SessionTable {
  id: string;
  user_id: number;
  created_at: string;
  last_seen_at: string;
  revoked_at: string | null;
}

export type ImportSource = 'csv' | 'api' | 'seed';

export interface ImportTable {
  id: Generated<number>;
  federation_id: number;
  user_id: number | null;
  source: ImportSource;
  file_name: string | null;
  file_hash: string | null;
  status: string;
  counts: ColumnType<string, string | undefined, string>;
  created_at: CreatedAt;
  committed_at: string | null;
  reverted_at: string | null;
}

export type CertificationLevel = 'trainee' | 'national' | 'international';

export interface ClassifierTable {
  id: Generated<number>;
  federation_id: number;
  code: string;
  display_name: string;
  certification_level: ColumnType<CertificationLevel, CertificationLevel | undefined, CertificationLevel>;
  active: ColumnType<number, number | undefined, number>;
  user_id: number | null;
  import_id: number | null;
  created_at: CreatedAt;
}

export interface AthleteTable {
  id: Generated<number>;
  federation_id: number;
  code: string;
  display_name: string | null;
  category: ColumnType<string, string | undefined, string>;
  import_id: number | null;
  created_at: CreatedAt;
}

export interface EventTable {
  id: Generated<number>;
  federation_id: number;
  code: string;
  name: string;
  starts_on: string | null;
  ends_on: string | null;
  level: ColumnType<string, string | undefined, string>;
  import_id: number | null;
  created_at: CreatedAt;
}

export type { AssessmentKind };

export interface AssessmentTable {
  id: Generated<number>;
  federation_id: number;
  external_id: string;
  athlete_id: number;
  event_id: number | null;
  assessed_on: string;
  kind: ColumnType<AssessmentKind, AssessmentKind | undefined, AssessmentKind>;
  panel_class: number | null;
  note: string | null;
  import_id: number | null;
  created_at: CreatedAt;
}

export interface RatingTable {
  id: Generated<number>;
  assessment_id: number;
  classifier_id: number;
  sport_class: number;
  import_id: number | null;
}

export interface AuditLogTable {
  id: Generated<number>;
  federation_id: number | null;
  user_id: number | null;
  action: string;
  entity: string;
  entity_id: string | null;
  detail: ColumnType<string, string | undefined, string>;
  at: CreatedAt;
}

/** Before-image of a row an import changed (JSON of the changed columns), for reverting it. */
export interface ImportChangeTable {
  id: Generated<number>;
  import_id: number;
  table_name: 'assessments' | 'ratings';
  row_id: number;
  before: string;
}

/** A column mapping saved by name for a federation's next upload. */
export interface ImportMappingTable {
  id: Generated<number>;
  federation_id: number;
  name: string;
  layout: 'long' | 'wide';
  mapping: string;
  date_format: ColumnType<string, string | undefined, string>;
  user_id: number | null;
  created_at: CreatedAt;
  updated_at: ColumnType<string, string | undefined, string>;
}

export interface CalibrationThresholdsTable {
  federation_id: number;
  thresholds: string;
  updated_by: number | null;
  updated_at: ColumnType<string, string | undefined, string>;
}

export interface CalibrationFlagTable {
  id: Generated<number>;
  federation_id: number;
  classifier_id: number;
  rule: 'bias' | 'drift' | 'agreement';
  status: ColumnType<
    'open' | 'acknowledged' | 'closed',
    'open' | 'acknowledged' | 'closed' | undefined,
    'open' | 'acknowledged' | 'closed'
  >;
  note: string | null;
  evidence: string;
  evidence_through: string | null;
  still_met: ColumnType<number, number | undefined, number>;
  status_by: number | null;
  opened_at: ColumnType<string, string | undefined, string>;
  updated_at: ColumnType<string, string | undefined, string>;
  evaluated_at: ColumnType<string, string | undefined, string>;
  /** When the last evaluation found the condition no longer met, and why (null while met). */
  lapsed_at: string | null;
  lapse_reason: string | null;
}

export interface ResearchExportSettingsTable {
  federation_id: number;
  /** Hex of the federation's HMAC-SHA-256 pseudonym key: server-side only. */
  pseudonym_key: string;
  min_athletes: ColumnType<number, number | undefined, number>;
  /** Quota of every researcher: exports in any 24 hours, and megabytes of files kept at once. */
  max_exports_per_day: ColumnType<number, number | undefined, number>;
  max_stored_megabytes: ColumnType<number, number | undefined, number>;
  created_at: CreatedAt;
  updated_at: string | null;
  updated_by: number | null;
}

export interface ResearchStudyTable {
  id: Generated<number>;
  federation_id: number;
  name: string;
  purpose: string | null;
  /** Hex of the study's stable pseudonym salt: server-side only. */
  salt: string;
  created_by: number | null;
  created_at: CreatedAt;
  closed_at: string | null;
}

export interface ResearchExportTable {
  id: Generated<number>;
  federation_id: number;
  user_id: number | null;
  study_id: number | null;
  /** The export request (scope, fields, date mode) as JSON. */
  request: string;
  min_athletes: number;
  counts: ColumnType<string, string | undefined, string>;
  /**
   * Names the export's gzip-compressed files in the exports folder (server/exports/storage.ts);
   * null while it is being built and once its files are removed.
   */
  storage_key: string | null;
  /** Bytes of the compressed files on disk (0 once removed). */
  stored_bytes: ColumnType<number, number | undefined, number>;
  /** When the files were removed (expiry); the row stays as the record. */
  removed_at: string | null;
  created_at: CreatedAt;
  expires_at: string;
}

/** What an export held, one row per assessment (kept after the files expire). */
export interface ResearchExportAssessmentTable {
  export_id: number;
  assessment_id: number;
  athlete_id: number;
  /** 32-bit hash of everything the export wrote about the assessment. */
  fingerprint: number;
}

export interface InvitationTable {
  id: Generated<number>;
  federation_id: number;
  email: string;
  role: Role;
  classifier_id: number | null;
  token_hash: string;
  invited_by: number | null;
  created_at: CreatedAt;
  expires_at: string;
  accepted_at: string | null;
  accepted_by: number | null;
  revoked_at: string | null;
}

export interface PasswordResetTable {
  id: Generated<number>;
  user_id: number;
  token_hash: string;
  created_at: CreatedAt;
  expires_at: string;
  used_at: string | null;
}

export type ApiTokenScope = 'import' | 'read';

export interface ApiTokenTable {
  id: Generated<number>;
  federation_id: number;
  name: string;
  scope: ApiTokenScope;
  token_hash: string;
  token_prefix: string;
  created_by: number | null;
  created_at: CreatedAt;
  last_used_at: string | null;
  revoked_at: string | null;
}

export interface OutboxMessageTable {
  id: Generated<number>;
  federation_slug: string | null;
  mail_from: string;
  mail_to: string;
  subject: string;
  text_body: string;
  html_body: string | null;
  raw: string;
  received_at: CreatedAt;
}

export type ExerciseStatus = 'draft' | 'open' | 'closed';

/** A calibration exercise: practice cases with reference classes, answered blind by the classifiers assigned. */
export interface ExerciseTable {
  id: Generated<number>;
  federation_id: number;
  title: string;
  status: ColumnType<ExerciseStatus, ExerciseStatus | undefined, ExerciseStatus>;
  opens_on: string;
  closes_on: string;
  source_kind: 'flag' | 'boundary' | null;
  source_ref: string | null;
  created_by: number | null;
  created_at: CreatedAt;
  opened_at: string | null;
  closed_at: string | null;
}

export interface ExerciseCaseTable {
  id: Generated<number>;
  exercise_id: number;
  position: number;
  description: string;
  video_url: string | null;
  /** JSON array of skill keys. */
  skills: ColumnType<string, string | undefined, string>;
  /** Half points; never sent to a classifier before the close. */
  reference_class: number;
}

export interface ExerciseAssignmentTable {
  exercise_id: number;
  classifier_id: number;
  flag_id: number | null;
  had_open_flag: ColumnType<number, number | undefined, number>;
  finished_at: string | null;
  invited_at: string | null;
  reminded_at: string | null;
  results_sent_at: string | null;
}

export interface ExerciseAnswerTable {
  id: Generated<number>;
  case_id: number;
  classifier_id: number;
  sport_class: number;
  skills: ColumnType<string, string | undefined, string>;
  reason: string | null;
  updated_at: ColumnType<string, string | undefined, string>;
}

export interface ExerciseFlagLinkTable {
  flag_id: number;
  exercise_id: number;
  linked_by: number | null;
  linked_at: ColumnType<string, string | undefined, string>;
}

/** A durable background job owed to a subject (server/workers/jobs.ts). */
export interface BackgroundJobTable {
  kind: string;
  subject: number;
  requested_at: Generated<string>;
  attempts: Generated<number>;
  last_error: string | null;
}

export interface Database {
  federations: FederationTable;
  users: UserTable;
  memberships: MembershipTable;
  sessions: SessionTable;
  imports: ImportTable;
  classifiers: ClassifierTable;
  athletes: AthleteTable;
  events: EventTable;
  assessments: AssessmentTable;
  ratings: RatingTable;
  audit_log: AuditLogTable;
  invitations: InvitationTable;
  password_resets: PasswordResetTable;
  api_tokens: ApiTokenTable;
  outbox_messages: OutboxMessageTable;
  calibration_thresholds: CalibrationThresholdsTable;
  calibration_flags: CalibrationFlagTable;
  research_export_settings: ResearchExportSettingsTable;
  research_studies: ResearchStudyTable;
  research_exports: ResearchExportTable;
  research_export_assessments: ResearchExportAssessmentTable;
  import_changes: ImportChangeTable;
  import_mappings: ImportMappingTable;
  exercises: ExerciseTable;
  exercise_cases: ExerciseCaseTable;
  exercise_assignments: ExerciseAssignmentTable;
  exercise_answers: ExerciseAnswerTable;
  exercise_flag_links: ExerciseFlagLinkTable;
  background_jobs: BackgroundJobTable;
}
