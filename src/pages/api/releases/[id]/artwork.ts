import { z } from 'zod';
import { getDb } from '@/lib/db/client';
import { ApiError } from '@/lib/server/errors';
import { getArtworkInfo, readArtworkBody, uploadArtwork } from '@/lib/server/metadata/artwork';
import { isReleaseVisible } from '@/lib/server/releases';
import { cachedJson, defineRoute, parseOrThrow } from '@/lib/server/route';
import { sanitizeDisplayName } from '@/lib/server/uploads/files';

const paramsSchema = z.object({ id: z.string().min(1).max(64) });
const uploadHeadersSchema = z.object({
  contentType: z.enum(['image/jpeg', 'image/png'], {
    error: 'Send the image itself as the body, with Content-Type image/jpeg or image/png.',
  }),
  fileName: z.string().trim().min(1).max(255),
});

/**
 * The X-File-Name header is the name percent-encoded (header values are Latin-1). A malformed
 * escape ("%E0%A4%A") is a 400, not the URIError decodeURIComponent throws.
 */
function decodeFileNameHeader(raw: string): string {
  try {
    return decodeURIComponent(raw);
  } catch {
    throw new ApiError(
      'invalid_request',
      'The X-File-Name header is not a valid percent-encoded name.',
      [{ path: 'x-file-name', message: 'Encode the file name with encodeURIComponent.' }],
    );
  }
}

/** The release's current cover art (facts and an address for the image), or null. */
export const GET = defineRoute('release:read', async (rc) => {
  const { id } = parseOrThrow(paramsSchema, rc.ctx.params, 'release address');
  return cachedJson(
    rc,
    async () => {
      if (!(await isReleaseVisible(getDb(), rc.actor, id))) {
        throw new ApiError('not_found', 'No release with that id is visible to you.');
      }
      return { artwork: await getArtworkInfo(getDb(), id) };
    },
    { audience: 'visibility' },
  );
});

/** Uploads new cover art: the body is the image; X-File-Name carries its name. */
export const POST = defineRoute('metadata:edit', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(paramsSchema, ctx.params, 'release address');
  const type = (ctx.request.headers.get('content-type') ?? '').split(';')[0]!.trim().toLowerCase();
  if (type !== 'image/jpeg' && type !== 'image/png') {
    throw new ApiError(
      'unsupported_media_type',
      'Cover art must be a JPEG or PNG, sent as image/jpeg or image/png.',
    );
  }
  const headers = parseOrThrow(
    uploadHeadersSchema,
    {
      contentType: type,
      fileName: decodeFileNameHeader(ctx.request.headers.get('x-file-name') ?? 'cover'),
    },
    'upload',
  );
  const bytes = await readArtworkBody(ctx.request);
  const artwork = await uploadArtwork(getDb(), actor, id, {
    bytes,
    // Kept for display only (the object key is made of ids), without paths or control and
    // bidirectional characters, as an uploaded master's name is.
    originalName: sanitizeDisplayName(headers.fileName) ?? 'cover',
  });
  return Response.json({ artwork }, { status: 201 });
});
