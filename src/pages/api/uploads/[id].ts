import { and, eq, inArray } from 'drizzle-orm';
import { z } from 'zod';
import { getDb } from '@/lib/db/client';
import { uploads } from '@/lib/db/schema';
import { ApiError } from '@/lib/server/errors';
import { defineRoute, parseOrThrow } from '@/lib/server/route';
import { cancelActiveUpload } from '@/lib/server/uploads/receive';

const paramsSchema = z.object({ id: z.uuid() });

/**
 * Cancels an upload. The receiving request stops, its partial bytes are discarded and the
 * row ends 'cancelled'; the track's previous file stays current. A finished upload is kept.
 */
export const DELETE = defineRoute('audio:upload', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(paramsSchema, ctx.params, 'upload address');
  const db = getDb();
  const [row] = await db
    .select({ state: uploads.state })
    .from(uploads)
    .where(and(eq(uploads.id, id), eq(uploads.organizationId, actor.organizationId)))
    .limit(1);
  if (!row) {
    // The body's first bytes may not have arrived yet: stop it if it is this process's.
    if (cancelActiveUpload(id)) return new Response(null, { status: 204 });
    throw new ApiError('not_found', 'No upload with that id.');
  }
  if (row.state === 'stored') {
    throw new ApiError(
      'conflict',
      'This upload has already been stored; replace the file instead.',
    );
  }
  cancelActiveUpload(id);
  await db
    .update(uploads)
    .set({ state: 'cancelled', error: 'The upload was cancelled.', updatedAt: new Date() })
    .where(and(eq(uploads.id, id), inArray(uploads.state, ['receiving', 'failed'])));
  return new Response(null, { status: 204 });
});
