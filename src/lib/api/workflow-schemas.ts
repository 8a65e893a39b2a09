/** JSON shapes of the workflow, sharing and delivery API, shared with the islands. */
import { z } from 'zod';

const signoffSchema = z.object({ by: z.string(), at: z.string(), current: z.boolean() }).nullable();

export const packageSchema = z.object({
  id: z.string(),
  version: z.number().int(),
  state: z.enum(['building', 'ready', 'failed']),
  sizeBytes: z.number().int().nullable(),
  sha256: z.string().nullable(),
  progressFiles: z.number().int(),
  totalFiles: z.number().int(),
  error: z.string().nullable(),
  createdAt: z.string(),
  readyAt: z.string().nullable(),
});

export const workflowStatusSchema = z.object({
  state: z.enum(['draft', 'in_review', 'approved', 'packaged', 'delivered', 'returned']),
  version: z.number().int(),
  signoffs: z.object({ audio: signoffSchema, metadata: signoffSchema }),
  checks: z.object({
    run: z.boolean(),
    stale: z.boolean(),
    failures: z.number().int(),
    warnings: z.number().int(),
  }),
  waivers: z.array(
    z.object({
      id: z.string(),
      findingKey: z.string(),
      waivedMeasured: z.string(),
      reason: z.string(),
      waivedBy: z.string(),
      waivedAt: z.string(),
      active: z.boolean(),
    }),
  ),
  blockers: z.object({
    failures: z.number().int(),
    unwaivedWarnings: z.array(
      z.object({
        key: z.string(),
        ruleId: z.string(),
        trackId: z.string().nullable(),
        message: z.string(),
      }),
    ),
    missing: z.array(z.string()),
  }),
  approvable: z.boolean(),
  packages: z.array(packageSchema),
  shares: z.array(
    z.object({ userId: z.string(), name: z.string(), email: z.string(), sharedAt: z.string() }),
  ),
  distributors: z.array(z.object({ userId: z.string(), name: z.string(), email: z.string() })),
  actions: z.array(
    z.enum(['submit_for_review', 'sign_off_audio', 'sign_off_metadata', 'approve', 'reopen']),
  ),
  canWaive: z.object({ audio: z.boolean(), metadata: z.boolean() }),
  canShare: z.boolean(),
});
export type WorkflowStatus = z.infer<typeof workflowStatusSchema>;

export const versionRequestSchema = z.object({ version: z.number().int().positive() });
export const reasonRequestSchema = z.object({
  reason: z
    .string()
    .trim()
    .min(3, 'Say why, in a few words')
    .max(2000, 'Keep it under 2000 characters'),
});
export const reopenRequestSchema = versionRequestSchema.extend(reasonRequestSchema.shape);
export const waiveRequestSchema = z
  .object({ findingKey: z.string().min(1).max(300) })
  .extend(reasonRequestSchema.shape);
export const shareRequestSchema = z.object({ userId: z.string().min(1).max(64) });

export const deliverySchema = z.object({
  releaseId: z.string(),
  title: z.string(),
  artist: z.string(),
  labelName: z.string(),
  catalogueNumber: z.string().nullable(),
  upcEan: z.string().nullable(),
  state: workflowStatusSchema.shape.state,
  sharedAt: z.string(),
  packages: z.array(
    packageSchema.extend({
      manifest: z.array(z.object({ path: z.string(), sha256: z.string() })).nullable(),
      downloads: z.number().int(),
    }),
  ),
});
export const deliveriesResponseSchema = z.object({ deliveries: z.array(deliverySchema) });
export type Delivery = z.infer<typeof deliverySchema>;

export const downloadResponseSchema = z.object({
  url: z.string(),
  expiresInSeconds: z.number().int(),
});

export const auditEventSchema = z.object({
  id: z.string(),
  action: z.string(),
  actor: z.string().nullable(),
  releaseId: z.string().nullable(),
  releaseTitle: z.string().nullable(),
  before: z.unknown(),
  after: z.unknown(),
  createdAt: z.string(),
});
export const auditResponseSchema = z.object({ events: z.array(auditEventSchema) });
export type AuditEventView = z.infer<typeof auditEventSchema>;
