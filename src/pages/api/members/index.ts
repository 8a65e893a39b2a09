import { listMembers } from '@/lib/server/members';
import { defineRoute } from '@/lib/server/route';

export const GET = defineRoute('member:manage', async ({ actor }) => {
  return Response.json(await listMembers(actor));
});
