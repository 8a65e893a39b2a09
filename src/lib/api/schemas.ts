/**
 * JSON shapes of the API, shared by the server (which builds them) and the islands (which
 * parse what they receive). Pure zod: safe in the browser bundle.
 */
import { z } from 'zod';

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

export const creditSchema = z.object({ name: z.string(), role: z.string() });

export const trackSchema = z.object({
  id: z.string(),
  position: z.number().int().positive(),
  disc: z.number().int().positive(),
  side: z.string().nullable(),
  gapBeforeFrames: z.number().int().nonnegative(),
  recordingId: z.string(),
  title: z.string(),
  versionTitle: z.string().nullable(),
  artist: z.string(),
  isrc: z.string().nullable(),
  iswc: z.string().nullable(),
  explicit: z.boolean(),
  credits: z.array(creditSchema),
  audio: z
    .object({
      fileVersion: z.number().int().positive(),
      originalName: z.string(),
      sizeBytes: z.number().int().nonnegative(),
      sha256: z.string(),
      sampleRateHz: z.number().int().nullable(),
      bitsPerSample: z.number().int().nullable(),
      channels: z.number().int().nullable(),
      durationSeconds: z.number().nullable(),
    })
    .nullable(),
});
export type Track = z.infer<typeof trackSchema>;

export const releaseDetailSchema = releaseSummarySchema.extend({
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
