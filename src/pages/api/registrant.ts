import { registrantInputSchema } from '@/lib/api/metadata-schemas';
import { getDb } from '@/lib/db/client';
import { getRegistrantInfo, setRegistrant } from '@/lib/server/metadata/isrc-allocation';
import { defineRoute, parseOrThrow, readJson } from '@/lib/server/route';

/** The label's ISRC registrant prefix and the next code; editors need it to allocate. */
export const GET = defineRoute('metadata:edit', async ({ actor }) =>
  Response.json(await getRegistrantInfo(getDb(), actor.organizationId)),
);

/** Sets the registrant prefix and designation range (admin only). */
export const PUT = defineRoute('registrant:manage', async ({ ctx, actor }) => {
  const input = parseOrThrow(registrantInputSchema, await readJson(ctx.request), 'registrant');
  return Response.json(await setRegistrant(getDb(), actor, input));
});
