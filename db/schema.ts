// Every table of Ringwell's database. Row types come from $inferSelect so that the server and the
// seed never restate a column.
import { sql } from 'drizzle-orm';
import {
  bigint,
  boolean,
  customType,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  text,
  timestamp,
  uniqueIndex,
  index,
  uuid,
} from 'drizzle-orm/pg-core';

export const roleEnum = pgEnum('role', ['admin', 'engineer', 'reviewer', 'viewer']);
export const roles = roleEnum.enumValues;
export type Role = (typeof roles)[number];

export const teams = pgTable('teams', {
  id: uuid('id').primaryKey().defaultRandom(),
  name: text('name').notNull(),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  /** The team's derating overrides (validated by the engine's deratingPolicySchema); null = defaults. */
  deratingPolicy: jsonb('derating_policy'),
  deratingUpdatedAt: timestamp('derating_updated_at', { withTimezone: true, precision: 3 }),
});

export const users = pgTable(
  'users',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    email: text('email').notNull(),
    name: text('name').notNull(),
    passwordHash: text('password_hash').notNull(),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex('users_email_unique').on(sql`lower(${t.email})`)],
);

export const memberships = pgTable(
  'memberships',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    teamId: uuid('team_id')
      .notNull()
      .references(() => teams.id, { onDelete: 'cascade' }),
    userId: uuid('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    role: roleEnum('role').notNull(),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex('memberships_team_user_unique').on(t.teamId, t.userId), index('memberships_user_idx').on(t.userId)],
);

// Timestamps of the workspace tables keep milliseconds only, so that a JavaScript Date read back
// compares equal to the stored value (keyset pagination depends on it).
const stamp = (name: string) => timestamp(name, { withTimezone: true, precision: 3 });
const createdAt = () => stamp('created_at').notNull().defaultNow();
const stampNow = (name: string) => stamp(name).notNull().defaultNow();

const bytea = customType<{ data: Buffer; driverData: Uint8Array }>({
  dataType: () => 'bytea',
  fromDriver: (value) => Buffer.from(value),
  toDriver: (value) => value,
});

/** Refresh-token sessions. A refresh rotates: the used row is revoked and a new row joins the same
 * family; access tokens name the family, so signing out (revoking the family) ends them too. */
export const sessions = pgTable(
  'sessions',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    familyId: uuid('family_id').notNull(),
    userId: uuid('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    /** SHA-256 hex of the refresh token; the token itself is never stored. */
    tokenHash: text('token_hash').notNull(),
    createdAt: createdAt(),
    expiresAt: stamp('expires_at').notNull(),
    revokedAt: stamp('revoked_at'),
    revokedReason: text('revoked_reason'),
    userAgent: text('user_agent'),
    ip: text('ip'),
  },
  (t) => [
    uniqueIndex('sessions_token_hash_unique').on(t.tokenHash),
    index('sessions_family_idx').on(t.familyId),
    index('sessions_user_idx').on(t.userId),
  ],
);

export const invitations = pgTable(
  'invitations',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    teamId: uuid('team_id')
      .notNull()
      .references(() => teams.id, { onDelete: 'cascade' }),
    email: text('email').notNull(),
    role: roleEnum('role').notNull(),
    tokenHash: text('token_hash').notNull(),
    invitedBy: uuid('invited_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
    expiresAt: stamp('expires_at').notNull(),
    acceptedAt: stamp('accepted_at'),
    acceptedBy: uuid('accepted_by').references(() => users.id, { onDelete: 'set null' }),
    revokedAt: stamp('revoked_at'),
  },
  (t) => [uniqueIndex('invitations_token_hash_unique').on(t.tokenHash), index('invitations_team_idx').on(t.teamId)],
);

export const projects = pgTable(
  'projects',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    teamId: uuid('team_id')
      .notNull()
      .references(() => teams.id, { onDelete: 'cascade' }),
    name: text('name').notNull(),
    description: text('description').notNull().default(''),
    createdBy: uuid('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
    updatedAt: stampNow('updated_at'),
    archivedAt: stamp('archived_at'),
  },
  (t) => [
    uniqueIndex('projects_team_name_unique').on(t.teamId, sql`lower(${t.name})`),
    index('projects_team_updated_idx').on(t.teamId, t.updatedAt),
  ],
);

export const analysisStatusEnum = pgEnum('analysis_status', ['pass', 'warn', 'fail', 'not-checked', 'not-run']);
export const designReviewStateEnum = pgEnum('design_review_state', ['none', 'requested', 'approved', 'changes-requested']);

export const designs = pgTable(
  'designs',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    /** Denormalised from the project so that every query can be scoped to a team in one step. */
    teamId: uuid('team_id')
      .notNull()
      .references(() => teams.id, { onDelete: 'cascade' }),
    projectId: uuid('project_id')
      .notNull()
      .references(() => projects.id, { onDelete: 'restrict' }),
    name: text('name').notNull(),
    description: text('description').notNull().default(''),
    presetId: text('preset_id'),
    /** The working copy, stored as the editor sent it: it may be invalid while being edited. */
    draft: jsonb('draft').notNull(),
    draftUpdatedAt: stampNow('draft_updated_at'),
    latestRevisionId: uuid('latest_revision_id'),
    revisionCount: integer('revision_count').notNull().default(0),
    /** Worst status of the latest revision's check. */
    status: analysisStatusEnum('status').notNull().default('not-run'),
    reviewState: designReviewStateEnum('review_state').notNull().default('none'),
    /** Which library part each slot's values came from (slot → part id), for the checks to cite. */
    partRefs: jsonb('part_refs').notNull().default({}),
    createdBy: uuid('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
    updatedAt: stampNow('updated_at'),
    archivedAt: stamp('archived_at'),
  },
  (t) => [index('designs_team_updated_idx').on(t.teamId, t.updatedAt), index('designs_project_idx').on(t.projectId)],
);

/** Immutable: a trigger in the migrations refuses UPDATE and DELETE. */
export const revisions = pgTable(
  'revisions',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    teamId: uuid('team_id')
      .notNull()
      .references(() => teams.id, { onDelete: 'restrict' }),
    designId: uuid('design_id')
      .notNull()
      .references(() => designs.id, { onDelete: 'restrict' }),
    sequence: integer('sequence').notNull(),
    /** Canonical serialisation (sorted keys, numbers as JSON) of the validated design: the hashed bytes. */
    designJson: text('design_json').notNull(),
    sha256: text('sha256').notNull(),
    engineVersion: text('engine_version').notNull(),
    /** The resolved derating policy the checks were judged against (team overrides at save time). */
    policy: jsonb('policy').notNull(),
    /** The check as saved: metrics, solvers, checks, notices, summary. */
    results: jsonb('results').notNull(),
    worstStatus: analysisStatusEnum('worst_status').notNull(),
    note: text('note').notNull().default(''),
    authorId: uuid('author_id')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('revisions_design_sequence_unique').on(t.designId, t.sequence), index('revisions_team_idx').on(t.teamId)],
);

export const analysisKindEnum = pgEnum('analysis_kind', ['check', 'precharge', 'spread', 'stability', 'snubber', 'mains-sweep', 'mains-cold-hot']);

/** Cached results of an analysis on a revision, one row per (revision, kind, options). */
export const analysisRuns = pgTable(
  'analysis_runs',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    teamId: uuid('team_id')
      .notNull()
      .references(() => teams.id, { onDelete: 'restrict' }),
    revisionId: uuid('revision_id')
      .notNull()
      .references(() => revisions.id, { onDelete: 'restrict' }),
    kind: analysisKindEnum('kind').notNull(),
    optionsHash: text('options_hash').notNull(),
    options: jsonb('options').notNull(),
    result: jsonb('result').notNull(),
    engineVersion: text('engine_version').notNull(),
    durationMs: integer('duration_ms').notNull(),
    createdBy: uuid('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('analysis_runs_key_unique').on(t.revisionId, t.kind, t.optionsHash)],
);

export const jobStateEnum = pgEnum('job_state', ['queued', 'running', 'done', 'cancelled', 'failed']);

/**
 * Background analyses (the tolerance spread) waiting for, or taken by, a worker. Every Ringwell
 * process runs a worker that claims the oldest queued job with `FOR UPDATE SKIP LOCKED`, so several
 * processes sharing one PostgreSQL server split the work and each job runs once.
 */
export const analysisJobs = pgTable(
  'analysis_jobs',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    teamId: uuid('team_id')
      .notNull()
      .references(() => teams.id, { onDelete: 'restrict' }),
    revisionId: uuid('revision_id')
      .notNull()
      .references(() => revisions.id, { onDelete: 'restrict' }),
    kind: analysisKindEnum('kind').notNull(),
    options: jsonb('options').notNull(),
    optionsHash: text('options_hash').notNull(),
    requestedBy: uuid('requested_by').references(() => users.id, { onDelete: 'set null' }),
    /** Who asked and from where, for the audit entry written when the result is stored. */
    audit: jsonb('audit').notNull().default({}),
    state: jobStateEnum('state').notNull().default('queued'),
    done: integer('done').notNull().default(0),
    total: integer('total').notNull(),
    cancelRequested: boolean('cancel_requested').notNull().default(false),
    /** The process that took it (host:pid:random). */
    worker: text('worker'),
    attempts: integer('attempts').notNull().default(0),
    runId: uuid('run_id').references(() => analysisRuns.id, { onDelete: 'set null' }),
    error: jsonb('error'),
    createdAt: createdAt(),
    startedAt: stamp('started_at'),
    heartbeatAt: stamp('heartbeat_at'),
    endedAt: stamp('ended_at'),
  },
  (t) => [
    index('analysis_jobs_queue_idx').on(t.state, t.createdAt),
    // A second request for the same analysis while one is queued or running joins it.
    uniqueIndex('analysis_jobs_active_unique')
      .on(t.revisionId, t.kind, t.optionsHash)
      .where(sql`state in ('queued', 'running')`),
  ],
);

export const reviewStateEnum = pgEnum('review_state', ['requested', 'approved', 'changes-requested', 'superseded']);

/** One row per (request, reviewer): rows of one request share requestId. */
export const reviews = pgTable(
  'reviews',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    requestId: uuid('request_id').notNull(),
    teamId: uuid('team_id')
      .notNull()
      .references(() => teams.id, { onDelete: 'restrict' }),
    designId: uuid('design_id')
      .notNull()
      .references(() => designs.id, { onDelete: 'restrict' }),
    revisionId: uuid('revision_id')
      .notNull()
      .references(() => revisions.id, { onDelete: 'restrict' }),
    requestedBy: uuid('requested_by')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    reviewerId: uuid('reviewer_id')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    note: text('note').notNull().default(''),
    state: reviewStateEnum('state').notNull().default('requested'),
    createdAt: createdAt(),
    decidedAt: stamp('decided_at'),
    decisionReason: text('decision_reason'),
    /** On approval: the revision hash and the checks table exactly as approved. */
    approvedSha256: text('approved_sha256'),
    checksSnapshot: jsonb('checks_snapshot'),
    supersededAt: stamp('superseded_at'),
  },
  (t) => [
    index('reviews_team_idx').on(t.teamId, t.createdAt),
    index('reviews_revision_idx').on(t.revisionId),
    index('reviews_reviewer_idx').on(t.reviewerId, t.state),
  ],
);

export const reviewComments = pgTable(
  'review_comments',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    teamId: uuid('team_id')
      .notNull()
      .references(() => teams.id, { onDelete: 'restrict' }),
    reviewId: uuid('review_id')
      .notNull()
      .references(() => reviews.id, { onDelete: 'restrict' }),
    revisionId: uuid('revision_id')
      .notNull()
      .references(() => revisions.id, { onDelete: 'restrict' }),
    authorId: uuid('author_id')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    /** The check the comment is about, or null for the revision as a whole. */
    checkId: text('check_id'),
    body: text('body').notNull(),
    createdAt: createdAt(),
  },
  (t) => [index('review_comments_review_idx').on(t.reviewId, t.createdAt)],
);

/** The team's ratings library (used by the measurements issue; the table exists from now). */
export const componentParts = pgTable(
  'component_parts',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    teamId: uuid('team_id')
      .notNull()
      .references(() => teams.id, { onDelete: 'cascade' }),
    type: text('type').notNull(),
    name: text('name').notNull(),
    ratings: jsonb('ratings').notNull(),
    archived: boolean('archived').notNull().default(false),
    createdBy: uuid('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
    updatedAt: stampNow('updated_at'),
  },
  (t) => [index('component_parts_team_idx').on(t.teamId, t.type)],
);

/** Uploaded files (bench captures), kept in the database with their hash. */
export const uploads = pgTable(
  'uploads',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    teamId: uuid('team_id')
      .notNull()
      .references(() => teams.id, { onDelete: 'cascade' }),
    designId: uuid('design_id').references(() => designs.id, { onDelete: 'set null' }),
    kind: text('kind').notNull(),
    fileName: text('file_name').notNull(),
    contentType: text('content_type').notNull(),
    byteSize: integer('byte_size').notNull(),
    sha256: text('sha256').notNull(),
    content: bytea('content').notNull(),
    uploadedBy: uuid('uploaded_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
  },
  (t) => [index('uploads_team_idx').on(t.teamId, t.createdAt)],
);

/** Bench captures: the original file lives on disk under <uploadsDir>/<sha256>; the row keeps the
 * mapping and a decimated copy (≤ 2000 points, min/max buckets) for the chart. */
export const benchCaptures = pgTable(
  'bench_captures',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    teamId: uuid('team_id')
      .notNull()
      .references(() => teams.id, { onDelete: 'cascade' }),
    designId: uuid('design_id')
      .notNull()
      .references(() => designs.id, { onDelete: 'cascade' }),
    name: text('name').notNull(),
    fileName: text('file_name').notNull(),
    contentType: text('content_type').notNull(),
    byteSize: integer('byte_size').notNull(),
    sha256: text('sha256').notNull(),
    /** File name under the uploads directory (the SHA-256 hex). */
    storedAs: text('stored_as').notNull(),
    /** The parse options and the column mapping the capture was read with. */
    mapping: jsonb('mapping').notNull(),
    rows: integer('rows').notNull(),
    /** { time: number[], channels: { column, name, quantity, unit, values: number[] }[] } in SI. */
    decimated: jsonb('decimated').notNull(),
    uploadedBy: uuid('uploaded_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
  },
  (t) => [index('bench_captures_design_idx').on(t.designId, t.createdAt), index('bench_captures_sha_idx').on(t.sha256)],
);

export const mailStatusEnum = pgEnum('mail_status', ['queued', 'sent', 'failed', 'captured']);

/** Every message the server sends (queued → sent | failed). The loopback SMTP capture fills in
 * received_* when the message arrives; a message from elsewhere lands as status 'captured'. */
export const mailOutbox = pgTable(
  'mail_outbox',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    teamId: uuid('team_id').references(() => teams.id, { onDelete: 'set null' }),
    toAddress: text('to_address').notNull(),
    subject: text('subject').notNull(),
    text: text('text').notNull(),
    html: text('html'),
    status: mailStatusEnum('status').notNull().default('queued'),
    error: text('error'),
    messageId: text('message_id'),
    /** What the message is about, e.g. ('review', id). */
    relatedType: text('related_type'),
    relatedId: text('related_id'),
    createdAt: createdAt(),
    sentAt: stamp('sent_at'),
    receivedAt: stamp('received_at'),
    /** As parsed from the wire by the capture server: from, to, subject, text, html. */
    received: jsonb('received'),
  },
  (t) => [index('mail_outbox_team_idx').on(t.teamId, t.createdAt), index('mail_outbox_to_idx').on(sql`lower(${t.toAddress})`)],
);

/** Append-only: a trigger in the migrations refuses UPDATE and DELETE. The actor is not a foreign
 * key so that removing an account never has to touch the log. */
export const auditLog = pgTable(
  'audit_log',
  {
    id: bigint('id', { mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
    teamId: uuid('team_id'),
    actorId: uuid('actor_id'),
    actorEmail: text('actor_email'),
    action: text('action').notNull(),
    entityType: text('entity_type'),
    entityId: text('entity_id'),
    details: jsonb('details').notNull().default({}),
    ip: text('ip'),
    createdAt: createdAt(),
  },
  (t) => [index('audit_log_team_idx').on(t.teamId, t.id), index('audit_log_action_idx').on(t.action)],
);

export type Team = typeof teams.$inferSelect;
export type User = typeof users.$inferSelect;
export type Membership = typeof memberships.$inferSelect;
export type Session = typeof sessions.$inferSelect;
export type Invitation = typeof invitations.$inferSelect;
export type Project = typeof projects.$inferSelect;
export type DesignRow = typeof designs.$inferSelect;
export type RevisionRow = typeof revisions.$inferSelect;
export type AnalysisRunRow = typeof analysisRuns.$inferSelect;
export type AnalysisJobRow = typeof analysisJobs.$inferSelect;
export type ReviewRow = typeof reviews.$inferSelect;
export type ReviewCommentRow = typeof reviewComments.$inferSelect;
export type ComponentPart = typeof componentParts.$inferSelect;
export type Upload = typeof uploads.$inferSelect;
export type BenchCaptureRow = typeof benchCaptures.$inferSelect;
export type MailOutboxRow = typeof mailOutbox.$inferSelect;
export type AuditRow = typeof auditLog.$inferSelect;
