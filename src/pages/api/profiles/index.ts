import { createProfileRequestSchema } from '@/lib/api/checks-schemas';
import { getDb } from '@/lib/db/client';
import { ApiError } from '@/lib/server/errors';
import { createProfile, listProfiles, resolveProfiles } from '@/lib/server/profiles';
import { defineRoute, parseOrThrow, readJson } from '@/lib/server/route';

/** Built-in and the label's own profiles (members choose targets from these). */
export const GET = defineRoute('release:read', async ({ actor }) => {
  return Response.json({ profiles: await listProfiles(getDb(), actor.organizationId) });
});

/** Makes a custom profile, as a copy of another or from rules given outright. */
export const POST = defineRoute('profile:manage', async ({ ctx, actor }) => {
  const input = parseOrThrow(createProfileRequestSchema, await readJson(ctx.request), 'profile');
  const db = getDb();
  let rules = input.rules;
  let basedOn: string | null = null;
  if (input.copyOf) {
    const [source] = await resolveProfiles(db, actor.organizationId, [input.copyOf]);
    if (!source) throw new ApiError('not_found', 'The profile to copy does not exist.');
    rules ??= source.rules;
    basedOn = source.id;
  }
  if (!rules)
    throw new ApiError('invalid_request', 'Give the rules, or a profile to copy them from.');
  const entry = await createProfile(db, actor, {
    name: input.name,
    description: input.description,
    rules,
    basedOn,
  });
  return Response.json(entry, { status: 201 });
});
