import { z } from 'zod';
import { getDb } from '@/lib/db/client';
import { ApiError } from '@/lib/server/errors';
import { getRelease } from '@/lib/server/releases';
import { cachedJson, defineRoute, parseOrThrow } from '@/lib/server/route';

const paramsSchema = z.object({ id: z.string().min(1).max(64) });

export const GET = defineRoute('release:read', async (rc) => {
  const { id } = parseOrThrow(paramsSchema, rc.ctx.params, 'release address');
  return cachedJson(
    rc,
    async () => {
      const release = await getRelease(getDb(), rc.actor, id);
      if (!release) throw new ApiError('not_found', 'No release with that id is visible to you.');
      return release;
    },
    { audience: 'visibility' },
  );
});
