import { and, asc, eq, inArray, isNotNull, sql } from 'drizzle-orm';
import type { RegistrantResponse } from '../../api/metadata-schemas';
import type { ReleaseDetail } from '../../api/schemas';
import type { Database } from '../../db/client';
import { isrcAllocations, isrcRegistrants, recordings, tracks } from '../../db/schema';
import {
  allocateIsrcs,
  allocateNextIsrc,
  yearOfReferenceFor,
} from '../../identifiers/isrc-allocation';
import { recordAudit } from '../audit';
import { ApiError } from '../errors';
import type { Actor } from '../route';
import {
  assertRecordingsUnlocked,
  assertUnlocked,
  loadReleaseRow,
  reloadRelease,
  type Tx,
  withWriteLock,
} from './common';
import { isUniqueViolation } from './isrc-guard';

/** Every ISRC the label has used or handed out: allocations (never deleted) and recordings. */
async function loadIssuedIsrcs(db: Database | Tx, organizationId: string): Promise<string[]> {
  const allocated = await db
    .select({ isrc: isrcAllocations.isrc })
    .from(isrcAllocations)
    .where(eq(isrcAllocations.organizationId, organizationId));
  const used = await db
    .select({ isrc: recordings.isrc })
    .from(recordings)
    .where(and(eq(recordings.organizationId, organizationId), isNotNull(recordings.isrc)));
  return [...allocated.map((r) => r.isrc), ...used.map((r) => r.isrc!)];
}

async function loadRegistrant(db: Database | Tx, organizationId: string) {
  const [row] = await db
    .select()
    .from(isrcRegistrants)
    .where(eq(isrcRegistrants.organizationId, organizationId))
    .limit(1);
  return row ?? null;
}

/** The label's registrant prefix and range, and the code the next allocation would give. */
export async function getRegistrantInfo(
  db: Database,
  organizationId: string,
  now = new Date(),
): Promise<RegistrantResponse> {
  const registrant = await loadRegistrant(db, organizationId);
  const [count] = await db
    .select({ n: sql<number>`count(*)` })
    .from(isrcAllocations)
    .where(eq(isrcAllocations.organizationId, organizationId));
  if (!registrant) return { registrant: null, nextIsrc: null, issuedCount: count?.n ?? 0 };
  const next = allocateNextIsrc({
    registrantPrefix: registrant.prefix,
    yearOfReference: yearOfReferenceFor(now),
    range: { first: registrant.rangeStart, last: registrant.rangeEnd },
    issued: await loadIssuedIsrcs(db, organizationId),
  });
  return {
    registrant: {
      prefix: registrant.prefix,
      rangeStart: registrant.rangeStart,
      rangeEnd: registrant.rangeEnd,
    },
    nextIsrc: next.ok ? next.isrc : null,
    issuedCount: count?.n ?? 0,
  };
}

/** Sets the label's registrant prefix and designation range (admin). */
export async function setRegistrant(
  db: Database,
  actor: Actor,
  input: { prefix: string; rangeStart: number; rangeEnd: number },
): Promise<RegistrantResponse> {
  await withWriteLock(() =>
    db.transaction(async (tx) => {
      const before = await loadRegistrant(tx, actor.organizationId);
      await tx
        .insert(isrcRegistrants)
        .values({ organizationId: actor.organizationId, ...input })
        .onConflictDoUpdate({
          target: isrcRegistrants.organizationId,
          set: { ...input, updatedAt: new Date() },
        });
      await recordAudit(tx, {
        organizationId: actor.organizationId,
        actorId: actor.userId,
        action: 'registrant.update',
        before: before
          ? { prefix: before.prefix, rangeStart: before.rangeStart, rangeEnd: before.rangeEnd }
          : null,
        after: input,
      });
    }),
  );
  return getRegistrantInfo(db, actor.organizationId);
}

/**
 * Gives the next free ISRCs of the label's prefix (this year of reference) to the named
 * tracks, or to every track of the release without one, in running order. One transaction:
 * the codes are recorded in isrc_allocations (primary key: never handed out twice) and set
 * on the recordings together.
 */
export async function allocateIsrcsToTracks(
  db: Database,
  actor: Actor,
  releaseId: string,
  trackIds: string[] | undefined,
  now = new Date(),
): Promise<{ allocated: { trackId: string; isrc: string }[]; release: ReleaseDetail }> {
  let allocated: { trackId: string; isrc: string }[] = [];
  try {
    allocated = await withWriteLock(() =>
      db.transaction(async (tx) => {
        const release = await loadReleaseRow(tx, actor, releaseId);
        assertUnlocked(release);
        const registrant = await loadRegistrant(tx, actor.organizationId);
        if (!registrant) {
          throw new ApiError(
            'conflict',
            'The label has no ISRC registrant prefix yet; an admin sets it under Settings → ISRC registrant.',
          );
        }
        const rows = await tx
          .select({
            trackId: tracks.id,
            recordingId: recordings.id,
            isrc: recordings.isrc,
            title: recordings.title,
            version: recordings.version,
          })
          .from(tracks)
          .innerJoin(recordings, eq(recordings.id, tracks.recordingId))
          .where(
            trackIds
              ? and(eq(tracks.releaseId, releaseId), inArray(tracks.id, trackIds))
              : eq(tracks.releaseId, releaseId),
          )
          .orderBy(asc(tracks.position));
        if (trackIds) {
          const found = new Set(rows.map((r) => r.trackId));
          const missing = trackIds.filter((id) => !found.has(id));
          if (missing.length > 0) {
            throw new ApiError('not_found', 'This release has no track with that id.');
          }
          const already = rows.find((r) => r.isrc);
          if (already) {
            throw new ApiError(
              'conflict',
              `“${already.title}” already has an ISRC; an ISRC stays with its recording. Clear it first if it is wrong.`,
            );
          }
        }
        // One code per recording, even when a recording appears twice on the release.
        const seen = new Set<string>();
        const targets = rows.filter((r) => {
          if (r.isrc || seen.has(r.recordingId)) return false;
          seen.add(r.recordingId);
          return true;
        });
        if (targets.length === 0) return [];
        await assertRecordingsUnlocked(
          tx,
          targets.map((t) => t.recordingId),
        );
        const result = allocateIsrcs(
          {
            registrantPrefix: registrant.prefix,
            yearOfReference: yearOfReferenceFor(now),
            range: { first: registrant.rangeStart, last: registrant.rangeEnd },
            issued: await loadIssuedIsrcs(tx, actor.organizationId),
          },
          targets.length,
        );
        if (!result.ok) throw new ApiError('conflict', result.message);
        const given: { trackId: string; isrc: string }[] = [];
        for (const [i, target] of targets.entries()) {
          const isrc = result.isrcs[i]!;
          await tx.insert(isrcAllocations).values({
            isrc,
            organizationId: actor.organizationId,
            recordingId: target.recordingId,
            allocatedBy: actor.userId,
          });
          await tx
            .update(recordings)
            .set({ isrc, version: target.version + 1, updatedAt: now })
            .where(eq(recordings.id, target.recordingId));
          await recordAudit(tx, {
            organizationId: actor.organizationId,
            releaseId,
            actorId: actor.userId,
            action: 'track.isrc.allocate',
            before: { trackId: target.trackId, title: target.title, isrc: null },
            after: { trackId: target.trackId, title: target.title, isrc },
          });
          given.push({ trackId: target.trackId, isrc });
        }
        return given;
      }),
    );
  } catch (error) {
    if (isUniqueViolation(error)) {
      throw new ApiError(
        'conflict',
        'Another allocation took the same code at the same moment; nothing was changed. Try again.',
      );
    }
    throw error;
  }
  return { allocated, release: await reloadRelease(db, actor, releaseId) };
}
