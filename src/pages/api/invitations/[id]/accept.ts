import { z } from 'zod';
import { acceptInvitationRequestSchema } from '@/lib/api/schemas';
import { acceptInvitation } from '@/lib/server/members';
import { definePublicRoute, parseOrThrow, readJson } from '@/lib/server/route';

const paramsSchema = z.object({ id: z.string().min(1).max(64) });

// Public: accepting an invitation is how an invited person gets an account.
export const POST = definePublicRoute(async ({ ctx }) => {
  const { id } = parseOrThrow(paramsSchema, ctx.params, 'invitation address');
  const input = parseOrThrow(acceptInvitationRequestSchema, await readJson(ctx.request), 'form');
  const authHeaders = await acceptInvitation(id, input);
  const headers = new Headers();
  for (const cookie of authHeaders.getSetCookie()) headers.append('set-cookie', cookie);
  return Response.json({ ok: true }, { status: 200, headers });
});
