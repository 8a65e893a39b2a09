import { inviteRequestSchema } from '@/lib/api/schemas';
import { inviteMember } from '@/lib/server/members';
import { defineRoute, parseOrThrow, readJson } from '@/lib/server/route';

export const POST = defineRoute('member:manage', async ({ ctx, actor }) => {
  const input = parseOrThrow(inviteRequestSchema, await readJson(ctx.request), 'invitation');
  const created = await inviteMember(actor, ctx.request.headers, input);
  return Response.json(created, { status: 201 });
});
