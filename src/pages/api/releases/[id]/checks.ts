import { z } from 'zod';
import { getDb } from '@/lib/db/client';
import { latestCheckReport, runChecks } from '@/lib/server/checks';
import { cachedJson, defineRoute, parseOrThrow } from '@/lib/server/route';

const paramsSchema = z.object({ id: z.string().min(1).max(64) });

/** The latest check run of the release (stale when anything it read has changed). */
export const GET = defineRoute('finding:read', async (rc) => {
  const { id } = parseOrThrow(paramsSchema, rc.ctx.params, 'release address');
  return cachedJson(rc, () => latestCheckReport(getDb(), rc.actor, id), { audience: 'visibility' });
});

/** Runs every target profile's checks now and records the run. */
export const POST = defineRoute('check:run', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(paramsSchema, ctx.params, 'release address');
  return Response.json(await runChecks(getDb(), actor, id), { status: 201 });
});
