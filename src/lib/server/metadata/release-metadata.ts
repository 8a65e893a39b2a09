import { and, asc, eq, inArray } from 'drizzle-orm';
import type { ReleaseUpdate } from '../../api/metadata-schemas';
import type { ReleaseDetail } from '../../api/schemas';
import type { Database } from '../../db/client';
import { profiles, releaseProfiles, releases } from '../../db/schema';
import { findBuiltInProfile } from '../../specs/profiles';
import { recordAudit } from '../audit';
import { ApiError } from '../errors';
import type { Actor } from '../route';
import {
  assertUnlocked,
  diffFields,
  loadReleaseRow,
  reloadRelease,
  staleRelease,
  type Tx,
  withWriteLock,
} from './common';

/**
 * Checks that every id names a delivery profile the label may target: a built-in one, or
 * one of the label's own profiles (the seam for custom profiles). Throws 400 otherwise.
 */
export async function assertKnownProfiles(
  db: Database | Tx,
  organizationId: string,
  profileIds: string[],
): Promise<void> {
  const unknown = profileIds.filter((id) => !findBuiltInProfile(id));
  if (unknown.length === 0) return;
  const own = await db
    .select({ id: profiles.id })
    .from(profiles)
    .where(and(eq(profiles.organizationId, organizationId), inArray(profiles.id, unknown)));
  const ownIds = new Set(own.map((p) => p.id));
  const missing = unknown.filter((id) => !ownIds.has(id));
  if (missing.length > 0) {
    throw new ApiError(
      'invalid_request',
      'The release form is not valid.',
      missing.map((id) => ({
        path: 'profileIds',
        message: `There is no delivery profile “${id}”.`,
      })),
    );
  }
}

/** Applies a release-form edit if `update.version` is still current; records the change. */
export async function updateReleaseMetadata(
  db: Database,
  actor: Actor,
  releaseId: string,
  update: ReleaseUpdate,
): Promise<ReleaseDetail> {
  const { version, profileIds, ...fields } = update;
  await withWriteLock(() =>
    db.transaction(async (tx) => {
      const row = await loadReleaseRow(tx, actor, releaseId);
      assertUnlocked(row);
      if (row.version !== version) throw staleRelease();
      const currentProfiles = (
        await tx
          .select({ id: releaseProfiles.profileId })
          .from(releaseProfiles)
          .where(eq(releaseProfiles.releaseId, releaseId))
          .orderBy(asc(releaseProfiles.profileId))
      ).map((p) => p.id);
      const diff = diffFields({ ...row, profileIds: currentProfiles } as Record<string, unknown>, {
        ...fields,
        ...(profileIds ? { profileIds: [...new Set(profileIds)].sort() } : {}),
      });
      if (Object.keys(diff.after).length === 0) return;
      if (profileIds) await assertKnownProfiles(tx, actor.organizationId, profileIds);
      const updated = await tx
        .update(releases)
        .set({ ...fields, version: version + 1, updatedAt: new Date() })
        .where(and(eq(releases.id, releaseId), eq(releases.version, version)))
        .returning({ id: releases.id });
      if (updated.length === 0) throw staleRelease();
      if (profileIds && 'profileIds' in diff.after) {
        await tx.delete(releaseProfiles).where(eq(releaseProfiles.releaseId, releaseId));
        const unique = [...new Set(profileIds)];
        if (unique.length > 0) {
          await tx
            .insert(releaseProfiles)
            .values(unique.map((profileId) => ({ releaseId, profileId })));
        }
      }
      await recordAudit(tx, {
        organizationId: actor.organizationId,
        releaseId,
        actorId: actor.userId,
        action: 'release.metadata.update',
        before: diff.before,
        after: diff.after,
      });
    }),
  );
  return reloadRelease(db, actor, releaseId);
}
