import { z } from 'zod';
import { layoutUpdateSchema } from '@/lib/api/metadata-schemas';
import { getDb } from '@/lib/db/client';
import { updateLayout } from '@/lib/server/metadata/layout';
import { defineRoute, parseOrThrow, readJson } from '@/lib/server/route';

const paramsSchema = z.object({ id: z.string().min(1).max(64) });

/** Sets the running order and gaps; the body lists every track and the release version read. */
export const PUT = defineRoute('order:edit', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(paramsSchema, ctx.params, 'release address');
  const layout = parseOrThrow(layoutUpdateSchema, await readJson(ctx.request), 'running order');
  return Response.json(await updateLayout(getDb(), actor, id, layout));
});
