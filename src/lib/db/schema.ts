/**
 * The database schema. The first block is better-auth's (user, session, account,
 * verification) and its organization plugin's (organization, member, invitation); the
 * rest is Quayside's own. Tables are plural snake_case for our own tables; better-auth's
 * keep the singular names its adapter expects.
 */
import { sql } from 'drizzle-orm';
import { index, integer, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';

const createdAt = () =>
  integer('created_at', { mode: 'timestamp_ms' })
    .notNull()
    .default(sql`(cast(unixepoch('subsecond') * 1000 as integer))`);
const updatedAt = () =>
  integer('updated_at', { mode: 'timestamp_ms' })
    .notNull()
    .default(sql`(cast(unixepoch('subsecond') * 1000 as integer))`);

// ── better-auth ─────────────────────────────────────────────────────────────────────────

export const user = sqliteTable('user', {
  id: text('id').primaryKey(),
  name: text('name').notNull(),
  email: text('email').notNull().unique(),
  emailVerified: integer('email_verified', { mode: 'boolean' }).notNull().default(false),
  image: text('image'),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
});

export const session = sqliteTable(
  'session',
  {
    id: text('id').primaryKey(),
    expiresAt: integer('expires_at', { mode: 'timestamp_ms' }).notNull(),
    token: text('token').notNull().unique(),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
    ipAddress: text('ip_address'),
    userAgent: text('user_agent'),
    userId: text('user_id')
      .notNull()
      .references(() => user.id, { onDelete: 'cascade' }),
    activeOrganizationId: text('active_organization_id'),
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
    accessTokenExpiresAt: integer('access_token_expires_at', { mode: 'timestamp_ms' }),
    refreshTokenExpiresAt: integer('refresh_token_expires_at', { mode: 'timestamp_ms' }),
    scope: text('scope'),
    password: text('password'),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [index('account_user_idx').on(t.userId)],
);

export const verification = sqliteTable('verification', {
  id: text('id').primaryKey(),
  identifier: text('identifier').notNull(),
  value: text('value').notNull(),
  expiresAt: integer('expires_at', { mode: 'timestamp_ms' }).notNull(),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
});

export const organization = sqliteTable('organization', {
  id: text('id').primaryKey(),
  name: text('name').notNull(),
  slug: text('slug').notNull().unique(),
  logo: text('logo'),
  metadata: text('metadata'),
  createdAt: createdAt(),
});

export const member = sqliteTable(
  'member',
  {
    id: text('id').primaryKey(),
    organizationId: text('organization_id')
      .notNull()
      .references(() => organization.id, { onDelete: 'cascade' }),
    userId: text('user_id')
      .notNull()
      .references(() => user.id, { onDelete: 'cascade' }),
    role: text('role').notNull(),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('member_org_user_idx').on(t.organizationId, t.userId)],
);

export const invitation = sqliteTable(
  'invitation',
  {
    id: text('id').primaryKey(),
    organizationId: text('organization_id')
      .notNull()
      .references(() => organization.id, { onDelete: 'cascade' }),
    email: text('email').notNull(),
    role: text('role'),
    status: text('status').notNull().default('pending'),
    expiresAt: integer('expires_at', { mode: 'timestamp_ms' }).notNull(),
    createdAt: createdAt(),
    inviterId: text('inviter_id')
      .notNull()
      .references(() => user.id, { onDelete: 'cascade' }),
  },
  (t) => [index('invitation_org_idx').on(t.organizationId)],
);

// ── Quayside ────────────────────────────────────────────────────────────────────────────

export const releaseStates = [
  'draft',
  'in_review',
  'approved',
  'packaged',
  'delivered',
  'returned',
] as const;
export type ReleaseState = (typeof releaseStates)[number];

export const releases = sqliteTable(
  'releases',
  {
    id: text('id').primaryKey(),
    organizationId: text('organization_id')
      .notNull()
      .references(() => organization.id, { onDelete: 'cascade' }),
    title: text('title').notNull(),
    artist: text('artist').notNull(),
    labelName: text('label_name').notNull(),
    catalogueNumber: text('catalogue_number'),
    /** UPC/EAN stored bare (digits only). */
    upcEan: text('upc_ean'),
    releaseDate: text('release_date'),
    genre: text('genre'),
    language: text('language'),
    pLine: text('p_line'),
    cLine: text('c_line'),
    explicit: integer('explicit', { mode: 'boolean' }).notNull().default(false),
    state: text('state', { enum: releaseStates }).notNull().default('draft'),
    /** Optimistic-locking counter: every update must name the version it read. */
    version: integer('version').notNull().default(1),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [index('releases_org_idx').on(t.organizationId)],
);

/** Which delivery profiles a release targets (built-in ids or custom profile ids). */
export const releaseProfiles = sqliteTable(
  'release_profiles',
  {
    releaseId: text('release_id')
      .notNull()
      .references(() => releases.id, { onDelete: 'cascade' }),
    profileId: text('profile_id').notNull(),
  },
  (t) => [uniqueIndex('release_profiles_pk').on(t.releaseId, t.profileId)],
);

/** A recording (one ISRC). The same recording may appear on several releases. */
export const recordings = sqliteTable(
  'recordings',
  {
    id: text('id').primaryKey(),
    organizationId: text('organization_id')
      .notNull()
      .references(() => organization.id, { onDelete: 'cascade' }),
    /** ISRC stored bare (12 characters, no hyphens); unique per organisation when set. */
    isrc: text('isrc'),
    title: text('title').notNull(),
    versionTitle: text('version_title'),
    artist: text('artist').notNull(),
    iswc: text('iswc'),
    explicit: integer('explicit', { mode: 'boolean' }).notNull().default(false),
    /** Credits as JSON: [{ name, role }]. */
    credits: text('credits', { mode: 'json' })
      .$type<{ name: string; role: string }[]>()
      .notNull()
      .default(sql`'[]'`),
    version: integer('version').notNull().default(1),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [
    uniqueIndex('recordings_org_isrc_idx')
      .on(t.organizationId, t.isrc)
      .where(sql`${t.isrc} is not null`),
  ],
);

export const tracks = sqliteTable(
  'tracks',
  {
    id: text('id').primaryKey(),
    releaseId: text('release_id')
      .notNull()
      .references(() => releases.id, { onDelete: 'cascade' }),
    recordingId: text('recording_id')
      .notNull()
      .references(() => recordings.id, { onDelete: 'restrict' }),
    position: integer('position').notNull(),
    /** Disc number (1-based) or vinyl side letter ("A", "B", …). */
    discOrSide: text('disc_or_side').notNull().default('1'),
    /** Silence before the track, in CD frames (1/75 s). */
    gapBeforeFrames: integer('gap_before_frames').notNull().default(0),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [index('tracks_release_idx').on(t.releaseId, t.position)],
);

/** One row per uploaded file version of a recording, with its measurements. */
export const audioFiles = sqliteTable(
  'audio_files',
  {
    id: text('id').primaryKey(),
    recordingId: text('recording_id')
      .notNull()
      .references(() => recordings.id, { onDelete: 'cascade' }),
    fileVersion: integer('file_version').notNull(),
    objectKey: text('object_key').notNull(),
    originalName: text('original_name').notNull(),
    sizeBytes: integer('size_bytes').notNull(),
    sha256: text('sha256').notNull(),
    sampleRateHz: integer('sample_rate_hz'),
    bitsPerSample: integer('bits_per_sample'),
    channels: integer('channels'),
    durationSamples: integer('duration_samples'),
    /** AudioMeasurements JSON (src/lib/audio/types.ts), null until analysed. */
    measurements: text('measurements', { mode: 'json' }),
    uploadedBy: text('uploaded_by').references(() => user.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('audio_files_recording_version_idx').on(t.recordingId, t.fileVersion)],
);

/** A release shared with a distributor account. */
export const releaseShares = sqliteTable(
  'release_shares',
  {
    releaseId: text('release_id')
      .notNull()
      .references(() => releases.id, { onDelete: 'cascade' }),
    userId: text('user_id')
      .notNull()
      .references(() => user.id, { onDelete: 'cascade' }),
    sharedBy: text('shared_by').references(() => user.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('release_shares_pk').on(t.releaseId, t.userId)],
);

/** Who changed what, when: before and after as JSON. Append-only. */
export const auditEvents = sqliteTable(
  'audit_events',
  {
    id: text('id').primaryKey(),
    organizationId: text('organization_id')
      .notNull()
      .references(() => organization.id, { onDelete: 'cascade' }),
    releaseId: text('release_id').references(() => releases.id, { onDelete: 'set null' }),
    actorId: text('actor_id').references(() => user.id, { onDelete: 'set null' }),
    action: text('action').notNull(),
    before: text('before', { mode: 'json' }),
    after: text('after', { mode: 'json' }),
    createdAt: createdAt(),
  },
  (t) => [index('audit_events_release_idx').on(t.releaseId, t.createdAt)],
);
