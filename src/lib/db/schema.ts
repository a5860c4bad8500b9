/**
 * The whole database. better-auth's four tables are written by hand (its CLI
 * needs Node 22) and checked against getAuthTables() in tests/app/schema.test.ts.
 * Every timestamp is an integer of UTC milliseconds since the epoch.
 */
import { sql } from 'drizzle-orm';
import { index, integer, real, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';
import { NETLIST_KINDS, REVIEW_STATES, REVISION_FORMATS, ROLES, RUN_KINDS, RUN_PLACES, RUN_STATUSES } from '../rules';

const now = sql`(cast(unixepoch('subsecond') * 1000 as integer))`;
const ts = (name: string) => integer(name, { mode: 'timestamp_ms' });

// ---- better-auth ---------------------------------------------------------

export const user = sqliteTable('user', {
  id: text('id').primaryKey(),
  name: text('name').notNull(),
  email: text('email').notNull().unique(),
  emailVerified: integer('email_verified', { mode: 'boolean' }).notNull().default(false),
  image: text('image'),
  createdAt: ts('created_at').notNull().default(now),
  updatedAt: ts('updated_at').notNull().default(now),
});

export const session = sqliteTable(
  'session',
  {
    id: text('id').primaryKey(),
    expiresAt: ts('expires_at').notNull(),
    token: text('token').notNull().unique(),
    createdAt: ts('created_at').notNull().default(now),
    updatedAt: ts('updated_at').notNull(),
    ipAddress: text('ip_address'),
    userAgent: text('user_agent'),
    userId: text('user_id')
      .notNull()
      .references(() => user.id, { onDelete: 'cascade' }),
  },
  (t) => [index('session_user_idx').on(t.userId)],
);

export const account = sqliteTable(
  'account',
  {
    id: text('id').primaryKey(),
    accountId: text('account_id').notNull(),
    providerId: text('provider_id').notNull(),
    userId: text('user_id')
      .notNull()
      .references(() => user.id, { onDelete: 'cascade' }),
    accessToken: text('access_token'),
    refreshToken: text('refresh_token'),
    idToken: text('id_token'),
    accessTokenExpiresAt: ts('access_token_expires_at'),
    refreshTokenExpiresAt: ts('refresh_token_expires_at'),
    scope: text('scope'),
    password: text('password'),
    createdAt: ts('created_at').notNull().default(now),
    updatedAt: ts('updated_at').notNull(),
  },
  (t) => [index('account_user_idx').on(t.userId)],
);

export const verification = sqliteTable(
  'verification',
  {
    id: text('id').primaryKey(),
    identifier: text('identifier').notNull(),
    value: text('value').notNull(),
    expiresAt: ts('expires_at').notNull(),
    createdAt: ts('created_at').notNull().default(now),
    updatedAt: ts('updated_at').notNull().default(now),
  },
  (t) => [index('verification_identifier_idx').on(t.identifier)],
);

// ---- Skiplane ------------------------------------------------------------

// The value sets live in ../rules so browser forms can share them.
export { NETLIST_KINDS, REVIEW_STATES, REVISION_FORMATS, ROLES, RUN_KINDS, RUN_PLACES, RUN_STATUSES } from '../rules';
export type { NetlistKind, RevisionFormat, Role } from '../rules';

export const projects = sqliteTable('projects', {
  id: text('id').primaryKey(),
  name: text('name').notNull(),
  description: text('description').notNull().default(''),
  createdBy: text('created_by').references(() => user.id, { onDelete: 'set null' }),
  createdAt: ts('created_at').notNull().default(now),
  updatedAt: ts('updated_at').notNull().default(now),
});

export const memberships = sqliteTable(
  'memberships',
  {
    projectId: text('project_id')
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    userId: text('user_id')
      .notNull()
      .references(() => user.id, { onDelete: 'cascade' }),
    role: text('role', { enum: ROLES }).notNull(),
    createdAt: ts('created_at').notNull().default(now),
  },
  (t) => [uniqueIndex('memberships_project_user_uq').on(t.projectId, t.userId), index('memberships_user_idx').on(t.userId)],
);

export const invitations = sqliteTable(
  'invitations',
  {
    id: text('id').primaryKey(),
    projectId: text('project_id')
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    email: text('email').notNull(),
    role: text('role', { enum: ROLES }).notNull(),
    // Only the SHA-256 of the token is kept: a database leak does not leak usable links.
    tokenHash: text('token_hash').notNull().unique(),
    invitedBy: text('invited_by').references(() => user.id, { onDelete: 'set null' }),
    createdAt: ts('created_at').notNull().default(now),
    expiresAt: ts('expires_at').notNull(),
    acceptedAt: ts('accepted_at'),
    acceptedBy: text('accepted_by').references(() => user.id, { onDelete: 'set null' }),
    revokedAt: ts('revoked_at'),
  },
  (t) => [index('invitations_project_idx').on(t.projectId)],
);

export const netlists = sqliteTable(
  'netlists',
  {
    id: text('id').primaryKey(),
    projectId: text('project_id')
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    name: text('name').notNull(),
    description: text('description').notNull().default(''),
    width: integer('width').notNull(),
    kind: text('kind', { enum: NETLIST_KINDS }).notNull(),
    createdBy: text('created_by').references(() => user.id, { onDelete: 'set null' }),
    createdAt: ts('created_at').notNull().default(now),
    updatedAt: ts('updated_at').notNull().default(now),
  },
  (t) => [uniqueIndex('netlists_project_name_uq').on(t.projectId, t.name)],
);

export const revisions = sqliteTable(
  'revisions',
  {
    id: text('id').primaryKey(),
    netlistId: text('netlist_id')
      .notNull()
      .references(() => netlists.id, { onDelete: 'cascade' }),
    number: integer('number').notNull(),
    format: text('format', { enum: REVISION_FORMATS }).notNull(),
    filename: text('filename'),
    message: text('message').notNull().default(''),
    content: text('content').notNull(),
    contentHash: text('content_hash').notNull(),
    sizeBytes: integer('size_bytes').notNull(),
    authorId: text('author_id').references(() => user.id, { onDelete: 'set null' }),
    createdAt: ts('created_at').notNull().default(now),
  },
  (t) => [uniqueIndex('revisions_netlist_number_uq').on(t.netlistId, t.number)],
);

export const runs = sqliteTable(
  'runs',
  {
    id: text('id').primaryKey(),
    revisionId: text('revision_id')
      .notNull()
      .references(() => revisions.id, { onDelete: 'cascade' }),
    kind: text('kind', { enum: RUN_KINDS }).notNull(),
    parameters: text('parameters', { mode: 'json' }).notNull().$type<Record<string, unknown>>(),
    // A decimal string: seeds may exceed 2^53.
    seed: text('seed'),
    status: text('status', { enum: RUN_STATUSES }).notNull().default('queued'),
    progress: real('progress').notNull().default(0),
    result: text('result', { mode: 'json' }).$type<Record<string, unknown> | null>(),
    engineVersion: text('engine_version').notNull(),
    place: text('place', { enum: RUN_PLACES }).notNull(),
    createdBy: text('created_by').references(() => user.id, { onDelete: 'set null' }),
    createdAt: ts('created_at').notNull().default(now),
    startedAt: ts('started_at'),
    finishedAt: ts('finished_at'),
  },
  (t) => [index('runs_revision_idx').on(t.revisionId)],
);

export const reviews = sqliteTable(
  'reviews',
  {
    id: text('id').primaryKey(),
    revisionId: text('revision_id')
      .notNull()
      .references(() => revisions.id, { onDelete: 'cascade' }),
    requesterId: text('requester_id').references(() => user.id, { onDelete: 'set null' }),
    reviewerId: text('reviewer_id').references(() => user.id, { onDelete: 'set null' }),
    state: text('state', { enum: REVIEW_STATES }).notNull().default('requested'),
    comment: text('comment').notNull().default(''),
    createdAt: ts('created_at').notNull().default(now),
    decidedAt: ts('decided_at'),
  },
  (t) => [index('reviews_revision_idx').on(t.revisionId)],
);

export const auditEvents = sqliteTable(
  'audit_events',
  {
    id: text('id').primaryKey(),
    // Kept after a project is deleted (set null) so the deletion itself stays on record.
    projectId: text('project_id').references(() => projects.id, { onDelete: 'set null' }),
    actorId: text('actor_id').references(() => user.id, { onDelete: 'set null' }),
    action: text('action').notNull(),
    objectType: text('object_type').notNull(),
    objectId: text('object_id').notNull(),
    details: text('details', { mode: 'json' }).$type<Record<string, unknown>>(),
    at: ts('at').notNull().default(now),
  },
  (t) => [index('audit_project_at_idx').on(t.projectId, t.at)],
);
