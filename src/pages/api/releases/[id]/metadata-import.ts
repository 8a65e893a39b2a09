import { z } from 'zod';
import { csvImportRequestSchema } from '@/lib/api/metadata-schemas';
import { getDb } from '@/lib/db/client';
import { importTrackCsv } from '@/lib/server/metadata/csv-import';
import { defineRoute, parseOrThrow, readJson } from '@/lib/server/route';

const paramsSchema = z.object({ id: z.string().min(1).max(64) });

/**
 * Previews (apply: false) or imports (apply: true) a track-metadata CSV. Nothing is written
 * unless every row is valid and no recording changed since the preview.
 */
export const POST = defineRoute('metadata:edit', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(paramsSchema, ctx.params, 'release address');
  const body = parseOrThrow(csvImportRequestSchema, await readJson(ctx.request), 'CSV import');
  return Response.json(await importTrackCsv(getDb(), actor, id, body));
});
