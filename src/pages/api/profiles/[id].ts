import { z } from 'zod';
import { updateProfileRequestSchema } from '@/lib/api/checks-schemas';
import { getDb } from '@/lib/db/client';
import { deleteProfile, getOwnProfile, updateProfile } from '@/lib/server/profiles';
import { defineRoute, parseOrThrow, readJson } from '@/lib/server/route';

const paramsSchema = z.object({ id: z.string().min(1).max(64) });

export const GET = defineRoute('profile:manage', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(paramsSchema, ctx.params, 'profile address');
  return Response.json(await getOwnProfile(getDb(), actor, id));
});

/** Saves a new version; the body names the version the editor read (409 when stale). */
export const PUT = defineRoute('profile:manage', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(paramsSchema, ctx.params, 'profile address');
  const input = parseOrThrow(updateProfileRequestSchema, await readJson(ctx.request), 'profile');
  return Response.json(await updateProfile(getDb(), actor, id, input));
});

export const DELETE = defineRoute('profile:manage', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(paramsSchema, ctx.params, 'profile address');
  await deleteProfile(getDb(), actor, id);
  return new Response(null, { status: 204 });
});
