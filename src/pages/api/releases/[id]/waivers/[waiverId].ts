import { z } from 'zod';
import { getDb } from '@/lib/db/client';
import { defineRoute, parseOrThrow } from '@/lib/server/route';
import { revokeWaiver } from '@/lib/server/workflow';

const paramsSchema = z.object({
  id: z.string().min(1).max(64),
  waiverId: z.string().min(1).max(64),
});

/** Withdraws a waiver (undo); the warning blocks approval again. */
export const DELETE = defineRoute('finding:read', async ({ ctx, actor }) => {
  const { id, waiverId } = parseOrThrow(paramsSchema, ctx.params, 'waiver address');
  return Response.json(await revokeWaiver(getDb(), actor, id, waiverId));
});
