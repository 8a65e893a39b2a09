import { z } from 'zod';
import { previewInvitation } from '@/lib/server/members';
import { definePublicRoute, parseOrThrow } from '@/lib/server/route';

const paramsSchema = z.object({ id: z.string().min(1).max(64) });

// Public: the invited person has no account yet; the unguessable id is the credential.
export const GET = definePublicRoute(async ({ ctx }) => {
  const { id } = parseOrThrow(paramsSchema, ctx.params, 'invitation address');
  return Response.json(await previewInvitation(id));
});
