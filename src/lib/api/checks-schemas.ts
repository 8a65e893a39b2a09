/** JSON shapes of the checks and profiles API, shared with the islands. Pure zod. */
import { z } from 'zod';
import { deliveryRulesSchema } from '../specs/schema';

export const findingSeveritySchema = z.enum(['pass', 'warning', 'failure']);

export const findingSchema = z.object({
  key: z.string(),
  ruleId: z.string(),
  profileId: z.string(),
  severity: findingSeveritySchema,
  trackId: z.string().nullable(),
  channel: z.number().int().nullable(),
  measured: z.union([z.number(), z.string()]).nullable(),
  limit: z.union([z.number(), z.string()]).nullable(),
  unit: z.string(),
  message: z.string(),
  atSeconds: z.number().optional(),
});
export type FindingView = z.infer<typeof findingSchema>;

export const verdictSchema = z.object({
  profileId: z.string(),
  trackId: z.string().nullable(),
  severity: findingSeveritySchema,
  failures: z.number().int(),
  warnings: z.number().int(),
});
export type VerdictView = z.infer<typeof verdictSchema>;

const normalizedLevelSchema = z.object({
  integratedLufs: z.number().nullable(),
  gainDb: z.number().nullable(),
  truePeakAfterDbtp: z.number().nullable(),
  exceedsCeiling: z.boolean(),
});
export const normalizationPreviewSchema = z.object({
  referenceLufs: z.number(),
  source: z.string(),
  ceilingDbtp: z.number(),
  tracks: z.array(normalizedLevelSchema.extend({ trackId: z.string() })),
  album: normalizedLevelSchema,
});
export type NormalizationPreviewView = z.infer<typeof normalizationPreviewSchema>;

export const checkReportSchema = z.object({
  run: z
    .object({
      id: z.string(),
      createdAt: z.string(),
      releaseVersion: z.number().int(),
      ranBy: z.string().nullable(),
    })
    .nullable(),
  stale: z.boolean(),
  profiles: z.array(z.object({ id: z.string(), name: z.string() })),
  tracks: z.array(
    z.object({
      id: z.string(),
      position: z.number().int(),
      title: z.string(),
      hasAudio: z.boolean(),
    }),
  ),
  findings: z.array(findingSchema),
  verdicts: z.array(verdictSchema),
  summary: z.object({
    failures: z.number().int(),
    warnings: z.number().int(),
    passes: z.number().int(),
  }),
  normalization: z.array(normalizationPreviewSchema),
});
export type CheckReportView = z.infer<typeof checkReportSchema>;

export const profileEntrySchema = z.object({
  profile: z.object({
    id: z.string(),
    name: z.string(),
    description: z.string(),
    version: z.number().int(),
    rules: deliveryRulesSchema,
  }),
  builtIn: z.boolean(),
  basedOn: z.string().nullable(),
  updatedAt: z.string().nullable(),
});
export type ProfileEntryView = z.infer<typeof profileEntrySchema>;
export const profileListSchema = z.object({ profiles: z.array(profileEntrySchema) });

const profileNameSchema = z
  .string()
  .trim()
  .min(1, 'Give the profile a name')
  .max(120, 'Use at most 120 characters');

export const createProfileRequestSchema = z.object({
  name: profileNameSchema,
  description: z.string().max(2000).default(''),
  /** Copy the rules of this built-in (or own) profile… */
  copyOf: z.string().min(1).max(64).optional(),
  /** …or give them outright. */
  rules: deliveryRulesSchema.optional(),
});

export const updateProfileRequestSchema = z.object({
  name: profileNameSchema,
  description: z.string().max(2000),
  rules: deliveryRulesSchema,
  version: z.number().int().positive(),
});
