// The one typed description of the database, shared by the app, the scripts and the tests.
import type { ColumnType, Generated } from 'kysely'
import type { MemberRole } from '../../shared/types/roles'
import type { ArtworkStatus } from '../../shared/types/artworks'
import type { AuditAction, AuditSubject } from '../../shared/types/audit'
import type { CleanUpChoice, EngineVersions, Measurements, StageTimings } from '../../shared/types/pipeline'
import type { PipelineSettings } from '../../shared/utils/settings'
import type { Halogen, PolymerSource, PolymerVerdict } from '../../shared/films/polymers'
import type { Opacity } from '../../shared/films/library'
import type { CutFailure, JobKind, JobState } from '../../shared/types/robots'
import type { StockEventKind, TestGridRecord } from '../../shared/types/films'
import type { LayerMeasurements, RevisionColour } from '../../shared/types/layers'
import type { RobotSide, RuleProfile } from '../../shared/plates/profiles'
import type { PlateFacts, RevisionOrigin } from '../../shared/types/plates'
import type { SheetWorkResult, WorkError, WorkKind, WorkPhase, WorkResult, WorkState } from '../../shared/types/work'

type CreatedAt = ColumnType<Date, Date | string | undefined, never>
type Timestamp = ColumnType<Date, Date | string, Date | string>

export interface ProgramTable {
  id: Generated<number>
  name: string
  school: string
  created_at: CreatedAt
  laser_work_width_mm: ColumnType<number | null, number | null | undefined, number | null>
  laser_work_height_mm: ColumnType<number | null, number | null | undefined, number | null>
  /** The competition rules for number plates that apply to every team (one of the program's rule_profile rows). */
  rule_profile_id: ColumnType<number | null, number | null | undefined, number | null>
}

export interface RuleProfileTable {
  id: Generated<number>
  program_id: number
  name: string
  /** Set when the row follows a shipped preset (shared/plates/profiles.ts); profile is then null. */
  preset_key: string | null
  /** The program's own copy, every field of RuleProfile; null when following a preset. */
  profile: ColumnType<RuleProfile | null, string | null, string | null>
  /** The preset or profile this copy was made from, for the page. */
  copied_from: string | null
  created_by: number
  created_at: CreatedAt
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}

export interface UsersTable {
  id: Generated<number>
  program_id: number
  email: string
  name: string
  password_hash: string | null
  active: Generated<boolean>
  created_at: CreatedAt
  last_sign_in_at: Timestamp | null
}

export interface MentorshipTable {
  user_id: number
  program_id: number
  created_at: CreatedAt
}

export interface TeamTable {
  id: Generated<number>
  program_id: number
  name: string
  number: string | null
  colour: string
  created_at: CreatedAt
}

export interface MembershipTable {
  user_id: number
  team_id: number
  role: MemberRole
  created_at: CreatedAt
}

export interface InvitationTable {
  id: Generated<number>
  program_id: number
  email: string
  name: string
  team_id: number | null
  role: MemberRole | 'mentor'
  token_hash: string
  invited_by: number | null
  expires_at: Timestamp
  used_at: Timestamp | null
  created_at: CreatedAt
}

export interface PasswordResetTable {
  id: Generated<number>
  user_id: number
  token_hash: string
  purpose: 'reset' | 'welcome'
  expires_at: Timestamp
  used_at: Timestamp | null
  created_at: CreatedAt
}

export interface AuditEventTable {
  id: Generated<number>
  program_id: number | null
  actor_id: number | null
  action: AuditAction
  subject_type: AuditSubject
  subject_id: string | null
  detail: ColumnType<Record<string, unknown>, string | undefined, string>
  ip: string | null
  at: CreatedAt
  /** The artwork, robot and job a line is about, for the history of each (indexed). */
  artwork_id: number | null
  robot_id: number | null
  job_id: number | null
}

export interface SignInAttemptTable {
  id: Generated<number>
  email: string
  ip: string
  succeeded: boolean
  at: CreatedAt
}

export interface ArtworkTable {
  id: Generated<number>
  team_id: number
  title: string
  author_id: number
  status: Generated<ArtworkStatus>
  created_at: CreatedAt
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}

export interface SourceTable {
  id: Generated<number>
  artwork_id: number
  object_key: string
  content_hash: string
  media_type: string
  file_name: string
  width_px: number
  height_px: number
  bytes: number
  uploaded_by: number
  created_at: CreatedAt
}

type Json<T> = ColumnType<T, string, never>

export interface RevisionTable {
  id: Generated<number>
  artwork_id: number
  number: number
  /** Null for a generated revision (origin 'generated'), which has no source. */
  source_id: number | null
  settings: Json<PipelineSettings>
  width_mm: number
  height_mm: number
  prepared_key: string | null
  outline_key: string | null
  vector_key: string
  measurements: Json<Measurements>
  timings: Json<StageTimings>
  engine_versions: Json<EngineVersions>
  /** What the clean-up chose and why (empty for revisions made before it was recorded). */
  choices: ColumnType<CleanUpChoice[], string | undefined, never>
  /** The drawing's width asked for, mm (null for revisions made before the decal was trimmed to it). */
  drawing_width_mm: ColumnType<number | null, number | undefined, never>
  /** 'traced' from a source through the pipeline; 'generated' by the plate generator (no source, prepared bitmap or raw outline). */
  origin: ColumnType<RevisionOrigin, RevisionOrigin | undefined, never>
  /** What the plate generator was asked, and the plate's measured figures, for a generated revision. */
  plate: ColumnType<PlateFacts | null, string | undefined, never>
  /** 1 for a one-colour revision; 2–6 for a layered one, whose vector is the stacked layers (migration 0013). */
  layer_count: ColumnType<number, number | undefined, never>
  /** What a layered revision's separation was asked and found; null for one colour. */
  colour: ColumnType<RevisionColour | null, string | undefined, never>
  author_id: number
  created_at: CreatedAt
}

/** One ink of a layered revision, bottom first (position 0); immutable like the revision. */
export interface RevisionLayerTable {
  revision_id: number
  position: number
  name: string
  hex: string
  /** Null for a generated revision's layer. */
  prepared_key: string | null
  outline_key: string | null
  /** The layer's clean vector as cut: stacked, with the registration marks, on the shared canvas. */
  vector_key: string
  measurements: Json<LayerMeasurements>
}

export interface RevisionStatusTable {
  revision_id: number
  status: ArtworkStatus
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
  updated_by: number | null
}

export interface ReviewEventTable {
  id: Generated<number>
  revision_id: number
  actor_id: number
  action: 'submit' | 'approve' | 'send-back'
  comment: Generated<string>
  at: CreatedAt
}

export interface PolymerTable {
  code: string
  name: string
  names: string[]
  halogens: Halogen[]
  chlorine_free: ColumnType<boolean, never, never>
  verdict: PolymerVerdict
  why: string
  sources: ColumnType<PolymerSource[], string, string>
}

export interface FilmTable {
  id: Generated<number>
  program_id: number
  name: string
  /** The register's code, and its verdict carried along (a composite key, ON UPDATE CASCADE). */
  polymer_code: string
  polymer_verdict: PolymerVerdict
  lab_approved_by: number | null
  lab_approved_at: Timestamp | null
  /** The safety data sheet the lab's approval was judged on. */
  lab_approval_sds: string | null
  /** Generated: allowed, or ask-the-lab with a recorded approval. */
  cleared: ColumnType<boolean, never, never>
  colour: string
  colour_hex: string
  opacity: Opacity
  thickness_mm: number
  sheet_width_mm: number
  sheet_height_mm: number
  min_feature_mm: number
  /** Null until measured: the common-practice default applies. */
  kerf_mm: number | null
  laser_power_pct: number
  laser_speed_mm_s: number
  laser_passes: number
  sheets_on_hand: Generated<number>
  retired: Generated<boolean>
  retired_reason: string | null
  created_at: CreatedAt
}

export interface FilmTestTable {
  id: Generated<number>
  film_id: number
  tested_by: number
  tested_at: CreatedAt
  grid: ColumnType<TestGridRecord, string, never>
  square: string | null
  power_pct: number | null
  speed_mm_s: number | null
  passes: number
  kerf_mm: number | null
  note: Generated<string>
}

export interface FilmStockEventTable {
  id: Generated<number>
  film_id: number
  kind: StockEventKind
  change: number
  on_hand: number
  job_id: number | null
  note: Generated<string>
  by_user: number
  at: CreatedAt
}

export interface RobotTable {
  id: Generated<number>
  team_id: number
  name: string
  season: string
  created_at: CreatedAt
}

export interface PlacementTable {
  id: Generated<number>
  robot_id: number
  revision_id: number
  film_id: number
  /** Always true for new rows (the key to the film's `cleared`); null only on rows from before the register whose film may not be cut. */
  film_cleared: ColumnType<boolean | null, true | undefined, true>
  spot: string
  /** Which side of the robot; null on rows from before sides were recorded. */
  side: RobotSide | null
  width_mm: number
  quantity: number
  spares: Generated<number>
  spares_on_hand: Generated<number>
  /** Its spares go in the robot's event kit with the plates' (migration 0015). */
  needed_at_events: Generated<boolean>
  created_by: number
  created_at: CreatedAt
  removed_by: number | null
  removed_at: Timestamp | null
  removed_reason: string | null
}

/** The film each layer of a layered placement is cut in (position 0 = bottom = placement.film_id). */
export interface PlacementLayerFilmTable {
  placement_id: number
  position: number
  film_id: number
  film_cleared: ColumnType<boolean | null, true | undefined, true>
}

/** Jobs queued together for one layered placement or reprint, one per layer. */
export interface JobOrderTable {
  id: Generated<number>
  placement_id: number
  created_by: number
  created_at: CreatedAt
}

export interface JobTable {
  id: Generated<number>
  placement_id: number
  kind: JobKind
  quantity: number
  reason: Generated<string>
  film_id: number
  film_cleared: ColumnType<boolean | null, true | undefined, true>
  /** The width the copies are cut at, fixed when the job is queued. */
  width_mm: number
  state: Generated<JobState>
  created_by: number
  created_at: CreatedAt
  cut_by: number | null
  cut_at: Timestamp | null
  sheets_used: number | null
  applied_by: number | null
  applied_at: Timestamp | null
  applied_count: number | null
  cancelled_by: number | null
  cancelled_at: Timestamp | null
  cancel_reason: string | null
  failed_by: number | null
  failed_at: Timestamp | null
  failure: CutFailure | null
  failure_note: string | null
  recut_of: number | null
  /** The batch it is cut in (migration 0010), while queued in one or once cut in it. */
  batch_id: ColumnType<number | null, number | null | undefined, number | null>
  /** Which layer of a layered revision this job cuts (with order_id); null for one colour. */
  layer: ColumnType<number | null, number | null | undefined, never>
  order_id: ColumnType<number | null, number | null | undefined, never>
}

export type BatchState = 'queued' | 'cut'

/** Queued jobs in one film of one program, cut together on shared sheets. */
export interface BatchTable {
  id: Generated<number>
  program_id: number
  film_id: number
  state: Generated<BatchState>
  created_by: number
  created_at: CreatedAt
  cut_by: number | null
  cut_at: Timestamp | null
  sheets_used: number | null
}

export interface MailOutboxTable {
  id: Generated<number>
  program_id: number | null
  to_email: string
  subject: string
  text: string
  html: string
  created_at: CreatedAt
  attempts: Generated<number>
  next_attempt_at: ColumnType<Date, Date | string | undefined, Date | string>
  last_error: string | null
  sent_at: Timestamp | null
}

export interface UserSessionTable {
  id_hash: string
  user_id: number
  created_at: CreatedAt
  last_seen_at: ColumnType<Date, Date | string | undefined, Date | string>
  expires_at: Timestamp
  ended_at: Timestamp | null
  ended_why: string | null
}

export interface RateCountTable {
  key: string
  window_started_at: Timestamp
  count: number
}

export interface IdempotentRequestTable {
  user_id: number
  /** Method and path, e.g. "POST /api/placements/12/reprints". */
  route: string
  key: string
  /** SHA-256 of the request's content, so a key cannot be reused for something else. */
  fingerprint: string
  /** Random per attempt, so a finished or failed attempt touches only its own row. */
  attempt: string
  started_at: ColumnType<Date, Date | string | undefined, Date | string>
  finished_at: Timestamp | null
  /** The answer's JSON, once the first request is done. */
  answer: ColumnType<unknown, string | null | undefined, string | null> | null
}

export interface ObjectClaimTable {
  token: string
  key: string
  claimed_at: CreatedAt
}

export interface HousekeepingTable {
  task: string
  last_run_at: Timestamp
}

export interface WorkItemTable {
  id: Generated<number>
  program_id: number
  kind: WorkKind
  state: ColumnType<WorkState, WorkState | undefined, WorkState>
  phase: ColumnType<WorkPhase, WorkPhase | undefined, WorkPhase>
  percent: ColumnType<number, number | undefined, number>
  input: ColumnType<unknown, string, string>
  source_key: string | null
  result: ColumnType<WorkResult | SheetWorkResult | null, string | null | undefined, string | null>
  error: ColumnType<WorkError | null, string | null | undefined, string | null>
  attempts: ColumnType<number, number | undefined, number>
  asked_by: number
  created_at: CreatedAt
  started_at: ColumnType<Date | null, never, Date | string | null>
  finished_at: ColumnType<Date | null, never, Date | string | null>
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}

export interface WorkRunnerTable {
  worker_id: string
  host: string
  pid: number
  seen_at: ColumnType<Date, Date | string | undefined, Date | string>
}

export interface Database {
  program: ProgramTable
  users: UsersTable
  mentorship: MentorshipTable
  team: TeamTable
  membership: MembershipTable
  invitation: InvitationTable
  password_reset: PasswordResetTable
  audit_event: AuditEventTable
  sign_in_attempt: SignInAttemptTable
  artwork: ArtworkTable
  source: SourceTable
  revision: RevisionTable
  revision_layer: RevisionLayerTable
  rule_profile: RuleProfileTable
  revision_status: RevisionStatusTable
  review_event: ReviewEventTable
  polymer: PolymerTable
  film: FilmTable
  film_test: FilmTestTable
  film_stock_event: FilmStockEventTable
  robot: RobotTable
  placement: PlacementTable
  job: JobTable
  job_order: JobOrderTable
  placement_layer_film: PlacementLayerFilmTable
  batch: BatchTable
  mail_outbox: MailOutboxTable
  user_session: UserSessionTable
  rate_count: RateCountTable
  idempotent_request: IdempotentRequestTable
  object_claim: ObjectClaimTable
  housekeeping: HousekeepingTable
  work_item: WorkItemTable
  work_runner: WorkRunnerTable
}
