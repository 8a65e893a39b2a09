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
    /** First release of this material elsewhere (reissues), ISO date. */
    originalReleaseDate: text('original_release_date'),
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
    /** Credits as JSON: [{ name, role, isni? }]. */
    credits: text('credits', { mode: 'json' })
      .$type<{ name: string; role: string; isni?: string | null }[]>()
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
    /** 1-based order within the release. */
    position: integer('position').notNull(),
    /** 1-based disc number (CD sets, multi-disc vinyl). */
    disc: integer('disc').notNull().default(1),
    /** Vinyl side letter ("A", "B", …); null for digital and CD. */
    side: text('side'),
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
    /** 'pending' | 'running' | 'done' | 'failed'. */
    analysisState: text('analysis_state', { enum: ['pending', 'running', 'done', 'failed'] })
      .notNull()
      .default('pending'),
    /** Plain-English reason when analysis failed (the file is kept). */
    analysisError: text('analysis_error'),
    analyzedAt: integer('analyzed_at', { mode: 'timestamp_ms' }),
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
    /** The distributor sees package versions from this one on (earlier ones were not shared). */
    fromPackageVersion: integer('from_package_version').notNull().default(1),
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

/** A label's own delivery profile (built-in profiles live in code, src/lib/specs). */
export const profiles = sqliteTable(
  'profiles',
  {
    id: text('id').primaryKey(),
    organizationId: text('organization_id')
      .notNull()
      .references(() => organization.id, { onDelete: 'cascade' }),
    name: text('name').notNull(),
    description: text('description').notNull().default(''),
    /** The built-in profile this one was copied from, if any. */
    basedOn: text('based_on'),
    /** DeliveryRules JSON, validated with deliveryRulesSchema on every read and write. */
    rules: text('rules', { mode: 'json' }).notNull(),
    version: integer('version').notNull().default(1),
    createdBy: text('created_by').references(() => user.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex('profiles_org_name_idx').on(t.organizationId, t.name)],
);

/** The result of one run of the checks over a release, kept for the record and the package. */
export const checkRuns = sqliteTable(
  'check_runs',
  {
    id: text('id').primaryKey(),
    releaseId: text('release_id')
      .notNull()
      .references(() => releases.id, { onDelete: 'cascade' }),
    /** The release version the checks saw. */
    releaseVersion: integer('release_version').notNull(),
    /** Finding[] JSON (src/lib/specs/types.ts). */
    findings: text('findings', { mode: 'json' }).notNull(),
    /** { failures, warnings, passes } counts. */
    summary: text('summary', { mode: 'json' }).notNull(),
    ranBy: text('ran_by').references(() => user.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
  },
  (t) => [index('check_runs_release_idx').on(t.releaseId, t.createdAt)],
);

/** A label's ISRC registrant code (prefix), and optionally the designation range it may use. */
export const isrcRegistrants = sqliteTable('isrc_registrants', {
  organizationId: text('organization_id')
    .primaryKey()
    .references(() => organization.id, { onDelete: 'cascade' }),
  /** Country/agency code + registrant code, 5 characters, e.g. "XQBRK". */
  prefix: text('prefix').notNull(),
  rangeStart: integer('range_start').notNull().default(0),
  rangeEnd: integer('range_end').notNull().default(99_999),
  updatedAt: updatedAt(),
});

/** Every ISRC ever handed out by Quayside: never deleted, never reused. */
export const isrcAllocations = sqliteTable(
  'isrc_allocations',
  {
    isrc: text('isrc').primaryKey(),
    organizationId: text('organization_id')
      .notNull()
      .references(() => organization.id, { onDelete: 'cascade' }),
    recordingId: text('recording_id').references(() => recordings.id, { onDelete: 'set null' }),
    allocatedBy: text('allocated_by').references(() => user.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
  },
  (t) => [index('isrc_allocations_org_idx').on(t.organizationId)],
);

/** Cover art of a release (the newest row is current). */
export const artworks = sqliteTable(
  'artworks',
  {
    id: text('id').primaryKey(),
    releaseId: text('release_id')
      .notNull()
      .references(() => releases.id, { onDelete: 'cascade' }),
    objectKey: text('object_key').notNull(),
    originalName: text('original_name').notNull(),
    format: text('format').notNull(),
    widthPx: integer('width_px').notNull(),
    heightPx: integer('height_px').notNull(),
    sizeBytes: integer('size_bytes').notNull(),
    sha256: text('sha256').notNull(),
    uploadedBy: text('uploaded_by').references(() => user.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
  },
  (t) => [index('artworks_release_idx').on(t.releaseId, t.createdAt)],
);

/** An upload in progress or finished: bytes are streamed to object storage, then analysed. */
export const uploads = sqliteTable(
  'uploads',
  {
    id: text('id').primaryKey(),
    organizationId: text('organization_id')
      .notNull()
      .references(() => organization.id, { onDelete: 'cascade' }),
    releaseId: text('release_id')
      .notNull()
      .references(() => releases.id, { onDelete: 'cascade' }),
    /** The track whose master this replaces; null when the upload adds a new track. */
    trackId: text('track_id').references(() => tracks.id, { onDelete: 'set null' }),
    /** The audio file row created when the upload completed. */
    audioFileId: text('audio_file_id').references(() => audioFiles.id, { onDelete: 'set null' }),
    objectKey: text('object_key').notNull(),
    originalName: text('original_name').notNull(),
    sizeBytes: integer('size_bytes'),
    bytesReceived: integer('bytes_received').notNull().default(0),
    /** 'receiving' | 'stored' | 'failed' | 'cancelled'. */
    state: text('state', { enum: ['receiving', 'stored', 'failed', 'cancelled'] })
      .notNull()
      .default('receiving'),
    error: text('error'),
    createdBy: text('created_by').references(() => user.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [index('uploads_release_idx').on(t.releaseId, t.createdAt)],
);

/**
 * A sign-off of a release's audio (engineer) or metadata (coordinator). It records what it
 * signed (a fingerprint of the checked inputs), so it lapses when those change.
 */
export const signoffs = sqliteTable(
  'signoffs',
  {
    id: text('id').primaryKey(),
    releaseId: text('release_id')
      .notNull()
      .references(() => releases.id, { onDelete: 'cascade' }),
    kind: text('kind', { enum: ['audio', 'metadata'] }).notNull(),
    fingerprint: text('fingerprint').notNull(),
    signedBy: text('signed_by').references(() => user.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
  },
  (t) => [index('signoffs_release_idx').on(t.releaseId, t.kind, t.createdAt)],
);

/** A warning waived with a written reason; it lapses when the waived value changes. */
export const waivers = sqliteTable(
  'waivers',
  {
    id: text('id').primaryKey(),
    releaseId: text('release_id')
      .notNull()
      .references(() => releases.id, { onDelete: 'cascade' }),
    findingKey: text('finding_key').notNull(),
    /** The finding's measured value when waived (see measuredFingerprint). */
    waivedMeasured: text('waived_measured').notNull(),
    reason: text('reason').notNull(),
    waivedBy: text('waived_by').references(() => user.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
    revokedAt: integer('revoked_at', { mode: 'timestamp_ms' }),
  },
  (t) => [index('waivers_release_idx').on(t.releaseId, t.findingKey)],
);

/** An immutable, versioned package of an approved release in object storage. */
export const packages = sqliteTable(
  'packages',
  {
    id: text('id').primaryKey(),
    releaseId: text('release_id')
      .notNull()
      .references(() => releases.id, { onDelete: 'cascade' }),
    version: integer('version').notNull(),
    /** 'building' until the object is complete and verified, then 'ready'; or 'failed'. */
    state: text('state', { enum: ['building', 'ready', 'failed'] })
      .notNull()
      .default('building'),
    objectKey: text('object_key').notNull(),
    sizeBytes: integer('size_bytes'),
    sha256: text('sha256'),
    /** [{ path, sizeBytes, sha256 }] of the payload, for the distributor's page. */
    manifest: text('manifest', { mode: 'json' }),
    progressFiles: integer('progress_files').notNull().default(0),
    totalFiles: integer('total_files').notNull().default(0),
    error: text('error'),
    createdBy: text('created_by').references(() => user.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
    readyAt: integer('ready_at', { mode: 'timestamp_ms' }),
  },
  (t) => [uniqueIndex('packages_release_version_idx').on(t.releaseId, t.version)],
);

/** Every package download: who, when, which version. */
export const packageDownloads = sqliteTable(
  'package_downloads',
  {
    id: text('id').primaryKey(),
    packageId: text('package_id')
      .notNull()
      .references(() => packages.id, { onDelete: 'cascade' }),
    userId: text('user_id').references(() => user.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
  },
  (t) => [index('package_downloads_package_idx').on(t.packageId)],
);

/** E-mail waiting to be sent; retried until the SMTP server accepts it. */
export const outbox = sqliteTable(
  'outbox',
  {
    id: text('id').primaryKey(),
    organizationId: text('organization_id').references(() => organization.id, {
      onDelete: 'cascade',
    }),
    toAddress: text('to_address').notNull(),
    subject: text('subject').notNull(),
    textBody: text('text_body').notNull(),
    htmlBody: text('html_body').notNull(),
    state: text('state', { enum: ['pending', 'sent', 'failed'] })
      .notNull()
      .default('pending'),
    attempts: integer('attempts').notNull().default(0),
    lastError: text('last_error'),
    createdAt: createdAt(),
    sentAt: integer('sent_at', { mode: 'timestamp_ms' }),
  },
  (t) => [index('outbox_state_idx').on(t.state, t.createdAt)],
);
