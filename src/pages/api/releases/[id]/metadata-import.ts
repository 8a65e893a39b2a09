import { z } from 'zod';
import { csvImportRequestSchema } from '@/lib/api/metadata-schemas';
import { getDb } from '@/lib/db/client';
import { importTrackCsv } from '@/lib/server/metadata/csv-import';
import { defineRoute, parseOrThrow, readJson } from '@/lib/server/route';

const paramsSchema = z.object({ id: z.string().min(1).max(64) });
/**
 * Largest request body read: the schema takes up to 2 MB of CSV text, which JSON may write
 * as up to 6 bytes a character ("\u0000"). Bigger bodies get a 413 before they are buffered.
 */
const MAX_IMPORT_BODY_BYTES = 16 * 1024 * 1024;

/**
 * Previews (apply: false) or imports (apply: true) a track-metadata CSV. Nothing is written
 * unless every row is valid and no recording changed since the preview.
 */
export const POST = defineRoute('metadata:edit', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(paramsSchema, ctx.params, 'release address');
  const body = parseOrThrow(
    csvImportRequestSchema,
    await readJson(ctx.request, { maxBytes: MAX_IMPORT_BODY_BYTES }),
    'CSV import',
  );
  return Response.json(await importTrackCsv(getDb(), actor, id, body));
});
