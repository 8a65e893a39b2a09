import { randomBytes } from 'node:crypto';
import { and, asc, eq, inArray } from 'drizzle-orm';
import type { Database } from '../db/client';
import { profiles, releaseProfiles, releases } from '../db/schema';
import { BUILT_IN_PROFILES, findBuiltInProfile } from '../specs/profiles';
import { type DeliveryProfile, type DeliveryRules, deliveryRulesSchema } from '../specs/schema';
import { recordAudit } from './audit';
import { ApiError } from './errors';
import type { Actor } from './route';

export interface ProfileEntry {
  profile: DeliveryProfile;
  builtIn: boolean;
  basedOn: string | null;
  updatedAt: string | null;
}

type ProfileRow = typeof profiles.$inferSelect;

function toEntry(row: ProfileRow): ProfileEntry {
  const rules = deliveryRulesSchema.safeParse(row.rules);
  if (!rules.success) {
    // A stored profile that no longer satisfies the schema is shown empty, never trusted.
    console.error(`[profiles] stored rules of ${row.id} are not valid`, rules.error.issues);
  }
  return {
    profile: {
      id: row.id,
      name: row.name,
      description: row.description,
      version: row.version,
      rules: rules.success ? rules.data : {},
    },
    builtIn: false,
    basedOn: row.basedOn,
    updatedAt: row.updatedAt.toISOString(),
  };
}

/** Built-in profiles first, then the organisation's own, by name. */
export async function listProfiles(db: Database, organizationId: string): Promise<ProfileEntry[]> {
  const rows = await db
    .select()
    .from(profiles)
    .where(eq(profiles.organizationId, organizationId))
    .orderBy(asc(profiles.name));
  return [
    ...BUILT_IN_PROFILES.map((profile) => ({
      profile,
      builtIn: true,
      basedOn: null,
      updatedAt: null,
    })),
    ...rows.map(toEntry),
  ];
}

/** The profiles with these ids visible to the organisation (unknown ids are left out). */
export async function resolveProfiles(
  db: Database,
  organizationId: string,
  ids: readonly string[],
): Promise<DeliveryProfile[]> {
  const custom = ids.filter((id) => !findBuiltInProfile(id));
  const rows = custom.length
    ? await db
        .select()
        .from(profiles)
        .where(and(eq(profiles.organizationId, organizationId), inArray(profiles.id, custom)))
    : [];
  const byId = new Map(rows.map((r) => [r.id, toEntry(r).profile]));
  return ids.flatMap((id) => {
    const found = findBuiltInProfile(id) ?? byId.get(id);
    return found ? [found] : [];
  });
}

/** Display names for profile ids (built-in or the organisation's own). */
export async function profileNames(
  db: Database,
  organizationId: string,
  ids: readonly string[],
): Promise<Map<string, string>> {
  const resolved = await resolveProfiles(db, organizationId, ids);
  return new Map(resolved.map((p) => [p.id, p.name]));
}

async function getOwnRow(db: Database, actor: Actor, id: string): Promise<ProfileRow> {
  const [row] = await db
    .select()
    .from(profiles)
    .where(and(eq(profiles.id, id), eq(profiles.organizationId, actor.organizationId)))
    .limit(1);
  if (!row) {
    throw new ApiError(
      'not_found',
      findBuiltInProfile(id)
        ? 'Built-in profiles cannot be changed; copy one to make your own.'
        : 'No such profile in your label.',
    );
  }
  return row;
}

export async function getOwnProfile(db: Database, actor: Actor, id: string): Promise<ProfileEntry> {
  return toEntry(await getOwnRow(db, actor, id));
}

async function assertNameFree(db: Database, actor: Actor, name: string, exceptId?: string) {
  const [clash] = await db
    .select({ id: profiles.id })
    .from(profiles)
    .where(and(eq(profiles.organizationId, actor.organizationId), eq(profiles.name, name)))
    .limit(1);
  if ((clash && clash.id !== exceptId) || BUILT_IN_PROFILES.some((p) => p.name === name)) {
    throw new ApiError(
      'conflict',
      `A profile named “${name}” already exists; choose another name.`,
    );
  }
}

/** Creates a custom profile, usually a copy of a built-in one. */
export async function createProfile(
  db: Database,
  actor: Actor,
  input: { name: string; description: string; rules: DeliveryRules; basedOn: string | null },
): Promise<ProfileEntry> {
  await assertNameFree(db, actor, input.name);
  const id = `custom-${randomBytes(5).toString('hex')}`;
  const [row] = await db
    .insert(profiles)
    .values({
      id,
      organizationId: actor.organizationId,
      name: input.name,
      description: input.description,
      basedOn: input.basedOn,
      rules: input.rules,
      createdBy: actor.userId,
    })
    .returning();
  if (!row) throw new ApiError('internal', 'The profile could not be saved.');
  await recordAudit(db, {
    organizationId: actor.organizationId,
    actorId: actor.userId,
    action: 'profile.created',
    after: { id, name: input.name, basedOn: input.basedOn, rules: input.rules },
  });
  return toEntry(row);
}

/** Saves a new version of a custom profile; `version` must be the one the editor read. */
export async function updateProfile(
  db: Database,
  actor: Actor,
  id: string,
  input: { name: string; description: string; rules: DeliveryRules; version: number },
): Promise<ProfileEntry> {
  const before = await getOwnRow(db, actor, id);
  await assertNameFree(db, actor, input.name, id);
  const [row] = await db
    .update(profiles)
    .set({
      name: input.name,
      description: input.description,
      rules: input.rules,
      version: before.version + 1,
      updatedAt: new Date(),
    })
    .where(and(eq(profiles.id, id), eq(profiles.version, input.version)))
    .returning();
  if (!row) {
    throw new ApiError(
      'conflict',
      'Someone else saved this profile since you opened it. Reload to see their version; your changes are still in the form.',
    );
  }
  await recordAudit(db, {
    organizationId: actor.organizationId,
    actorId: actor.userId,
    action: 'profile.updated',
    before: { name: before.name, version: before.version, rules: before.rules },
    after: { name: row.name, version: row.version, rules: row.rules },
  });
  return toEntry(row);
}

/** Deletes a custom profile no release targets. */
export async function deleteProfile(db: Database, actor: Actor, id: string): Promise<void> {
  const row = await getOwnRow(db, actor, id);
  const used = await db
    .select({ title: releases.title })
    .from(releaseProfiles)
    .innerJoin(releases, eq(releases.id, releaseProfiles.releaseId))
    .where(eq(releaseProfiles.profileId, id));
  if (used.length > 0) {
    throw new ApiError(
      'conflict',
      `This profile is a target of ${used.map((u) => `“${u.title}”`).join(', ')}; remove it there first.`,
    );
  }
  await db.delete(profiles).where(eq(profiles.id, id));
  await recordAudit(db, {
    organizationId: actor.organizationId,
    actorId: actor.userId,
    action: 'profile.deleted',
    before: { id, name: row.name, rules: row.rules },
  });
}
