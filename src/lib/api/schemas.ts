/**
 * JSON shapes of the API, shared by the server (which builds them) and the islands (which
 * parse what they receive). Pure zod: safe in the browser bundle.
 */
import { z } from 'zod';
import type { AudioMeasurements } from '../audio/types';

export const releaseStateSchema = z.enum([
  'draft',
  'in_review',
  'approved',
  'packaged',
  'delivered',
  'returned',
]);
export type ReleaseStateValue = z.infer<typeof releaseStateSchema>;

export const releaseStateLabels: Record<ReleaseStateValue, string> = {
  draft: 'Draft',
  in_review: 'In review',
  approved: 'Approved',
  packaged: 'Packaged',
  delivered: 'Delivered',
  returned: 'Returned',
};

export const releaseSummarySchema = z.object({
  id: z.string(),
  title: z.string(),
  artist: z.string(),
  labelName: z.string(),
  catalogueNumber: z.string().nullable(),
  upcEan: z.string().nullable(),
  releaseDate: z.string().nullable(),
  state: releaseStateSchema,
  /** Target delivery profiles with their display names. */
  profiles: z.array(z.object({ id: z.string(), name: z.string() })),
  trackCount: z.number().int().nonnegative(),
  totalDurationSeconds: z.number().nonnegative().nullable(),
  updatedAt: z.string(),
  version: z.number().int().positive(),
});
export type ReleaseSummary = z.infer<typeof releaseSummarySchema>;

export const releaseListSchema = z.object({ releases: z.array(releaseSummarySchema) });
export type ReleaseList = z.infer<typeof releaseListSchema>;

export const creditSchema = z.object({
  name: z.string(),
  role: z.string(),
  isni: z.string().nullable().optional(),
});

export const trackSchema = z.object({
  id: z.string(),
  position: z.number().int().positive(),
  disc: z.number().int().positive(),
  side: z.string().nullable(),
  gapBeforeFrames: z.number().int().nonnegative(),
  recordingId: z.string(),
  /** The recording's optimistic-locking counter; track edits name it. */
  recordingVersion: z.number().int().positive(),
  title: z.string(),
  versionTitle: z.string().nullable(),
  artist: z.string(),
  isrc: z.string().nullable(),
  iswc: z.string().nullable(),
  explicit: z.boolean(),
  credits: z.array(creditSchema),
  audio: z
    .object({
      audioFileId: z.string(),
      fileVersion: z.number().int().positive(),
      originalName: z.string(),
      sizeBytes: z.number().int().nonnegative(),
      sha256: z.string(),
      sampleRateHz: z.number().int().nullable(),
      bitsPerSample: z.number().int().nullable(),
      channels: z.number().int().nullable(),
      durationSeconds: z.number().nullable(),
      /** 'pending' | 'running' | 'done' | 'failed' (issue 6). */
      analysisState: z.enum(['pending', 'running', 'done', 'failed']),
    })
    .nullable(),
});
export type Track = z.infer<typeof trackSchema>;

export const releaseDetailSchema = releaseSummarySchema.extend({
  originalReleaseDate: z.string().nullable(),
  genre: z.string().nullable(),
  language: z.string().nullable(),
  pLine: z.string().nullable(),
  cLine: z.string().nullable(),
  explicit: z.boolean(),
  tracks: z.array(trackSchema),
});
export type ReleaseDetail = z.infer<typeof releaseDetailSchema>;

export const apiErrorSchema = z.object({
  error: z.object({
    code: z.string(),
    message: z.string(),
    issues: z.array(z.object({ path: z.string(), message: z.string() })).optional(),
  }),
});
export type ApiErrorBody = z.infer<typeof apiErrorSchema>;

export const memberSchema = z.object({
  id: z.string(),
  userId: z.string(),
  name: z.string(),
  email: z.string(),
  role: z.string(),
  joinedAt: z.string(),
});
export const invitationSchema = z.object({
  id: z.string(),
  email: z.string(),
  role: z.string().nullable(),
  status: z.string(),
  expiresAt: z.string(),
});
export const membersResponseSchema = z.object({
  members: z.array(memberSchema),
  invitations: z.array(invitationSchema),
});
export type MembersResponse = z.infer<typeof membersResponseSchema>;

export const inviteRequestSchema = z.object({
  email: z
    .email('Enter an e-mail address such as name@example.com')
    .transform((s) => s.toLowerCase()),
  role: z.enum(['admin', 'engineer', 'coordinator', 'distributor'], {
    error: 'Choose one of: admin, engineer, coordinator, distributor',
  }),
});

export const acceptInvitationRequestSchema = z.object({
  name: z.string().trim().min(1, 'Enter your name').max(120),
  password: z.string().min(10, 'Use at least 10 characters').max(128, 'Use at most 128 characters'),
});

export const invitationPreviewSchema = z.object({
  id: z.string(),
  email: z.string(),
  role: z.string().nullable(),
  organizationName: z.string(),
  status: z.string(),
  expiresAt: z.string(),
});

// ── Uploads and track pages (issue 6) ───────────────────────────────────────────────────

export const analysisStateSchema = z.enum(['pending', 'running', 'done', 'failed']);
export type AnalysisStateValue = z.infer<typeof analysisStateSchema>;

/** One stored file version of a recording, without its measurements. */
export const audioFileVersionSchema = z.object({
  id: z.string(),
  fileVersion: z.number().int().positive(),
  originalName: z.string(),
  sizeBytes: z.number().int().nonnegative(),
  sha256: z.string(),
  sampleRateHz: z.number().int().nullable(),
  bitsPerSample: z.number().int().nullable(),
  channels: z.number().int().nullable(),
  durationSeconds: z.number().nullable(),
  analysisState: analysisStateSchema,
  analysisError: z.string().nullable(),
  /** 0…1 while the analysis runs, else null. */
  analysisProgress: z.number().min(0).max(1).nullable(),
  uploadedBy: z.string().nullable(),
  uploadedAt: z.string(),
});
export type AudioFileVersion = z.infer<typeof audioFileVersionSchema>;

export const uploadRecordSchema = z.object({
  id: z.string(),
  originalName: z.string(),
  state: z.enum(['receiving', 'stored', 'failed', 'cancelled']),
  bytesReceived: z.number().int().nonnegative(),
  sizeBytes: z.number().int().nullable(),
  error: z.string().nullable(),
  trackId: z.string().nullable(),
  audioFileId: z.string().nullable(),
  createdAt: z.string(),
});

/** GET /api/releases/:id/uploads: each track's current file and the recent uploads. */
export const uploadStatusSchema = z.object({
  maxUploadBytes: z.number().int().positive(),
  tracks: z.array(
    z.object({
      id: z.string(),
      position: z.number().int().positive(),
      title: z.string(),
      current: audioFileVersionSchema.nullable(),
      versionCount: z.number().int().nonnegative(),
    }),
  ),
  uploads: z.array(uploadRecordSchema),
});
export type UploadStatus = z.infer<typeof uploadStatusSchema>;

/** POST /api/releases/:id/uploads answer. */
export const uploadResultSchema = z.object({
  uploadId: z.string(),
  audioFileId: z.string(),
  trackId: z.string(),
  recordingId: z.string(),
  fileVersion: z.number().int().positive(),
  sizeBytes: z.number().int().nonnegative(),
  sha256: z.string(),
  originalName: z.string(),
});
export type UploadResult = z.infer<typeof uploadResultSchema>;

/** GET /api/tracks/:id: a track's files and the current file's measurements. */
export const trackDetailSchema = z.object({
  track: z.object({
    id: z.string(),
    position: z.number().int().positive(),
    title: z.string(),
    artist: z.string(),
    isrc: z.string().nullable(),
    releaseId: z.string(),
    releaseTitle: z.string(),
  }),
  /** Loudness band from the release's first profile that sets one, for the plot. */
  loudnessTarget: z
    .object({ profileName: z.string(), minLufs: z.number(), maxLufs: z.number() })
    .nullable(),
  truePeakCeiling: z.object({ profileName: z.string(), ceilingDbtp: z.number() }).nullable(),
  current: audioFileVersionSchema.nullable(),
  /** AudioMeasurements (src/lib/audio/types.ts) of the current file once analysed. */
  measurements: z.custom<AudioMeasurements>((v) => typeof v === 'object' && v !== null).nullable(),
  versions: z.array(audioFileVersionSchema),
  canUpload: z.boolean(),
});
export type TrackDetail = z.infer<typeof trackDetailSchema>;
