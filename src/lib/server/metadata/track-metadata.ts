import { and, eq } from 'drizzle-orm';
import type { TrackUpdate } from '../../api/metadata-schemas';
import type { ReleaseDetail } from '../../api/schemas';
import type { Database } from '../../db/client';
import { isrcAllocations, isrcRegistrants, recordings, tracks } from '../../db/schema';
import { recordAudit } from '../audit';
import { ApiError } from '../errors';
import type { Actor } from '../route';
import {
  assertRecordingsUnlocked,
  assertUnlocked,
  diffFields,
  loadReleaseRow,
  reloadRelease,
  staleRecording,
  type Tx,
  withWriteLock,
} from './common';
import { assertIsrcFreeFor, isUniqueViolation } from './isrc-guard';

/** The track of `releaseId` with id `trackId`, joined with its recording; 404 otherwise. */
export async function loadTrack(db: Database | Tx, releaseId: string, trackId: string) {
  const [row] = await db
    .select({ track: tracks, recording: recordings })
    .from(tracks)
    .innerJoin(recordings, eq(recordings.id, tracks.recordingId))
    .where(and(eq(tracks.id, trackId), eq(tracks.releaseId, releaseId)))
    .limit(1);
  if (!row) throw new ApiError('not_found', 'This release has no track with that id.');
  return row;
}

/** Records a code typed by hand under the label's own prefix, so it is never handed out again. */
export async function reserveOwnIsrc(
  tx: Tx,
  actor: Actor,
  recordingId: string,
  isrc: string,
): Promise<void> {
  const [registrant] = await tx
    .select()
    .from(isrcRegistrants)
    .where(eq(isrcRegistrants.organizationId, actor.organizationId))
    .limit(1);
  if (!registrant || !isrc.startsWith(registrant.prefix)) return;
  await tx
    .insert(isrcAllocations)
    .values({ isrc, organizationId: actor.organizationId, recordingId, allocatedBy: actor.userId })
    .onConflictDoNothing();
}

/**
 * Applies a track-form edit: recording fields (title, version, artist, ISRC, ISWC, explicit,
 * credits) and the track's disc/side. `recordingVersion` must still be current.
 */
export async function updateTrackMetadata(
  db: Database,
  actor: Actor,
  releaseId: string,
  trackId: string,
  update: TrackUpdate,
): Promise<ReleaseDetail> {
  const { recordingVersion, disc, side, ...recordingFields } = update;
  try {
    await withWriteLock(() =>
      db.transaction(async (tx) => {
        const release = await loadReleaseRow(tx, actor, releaseId);
        assertUnlocked(release);
        const { track, recording } = await loadTrack(tx, releaseId, trackId);
        if (recording.version !== recordingVersion) throw staleRecording(recording.title);
        const credits = recordingFields.credits?.map((c) => ({
          name: c.name,
          role: c.role,
          ...(c.isni ? { isni: c.isni } : {}),
        }));
        const recDiff = diffFields(recording as Record<string, unknown>, {
          ...recordingFields,
          ...(credits ? { credits } : {}),
        });
        const trackDiff = diffFields(track as Record<string, unknown>, { disc, side });
        if (Object.keys(recDiff.after).length + Object.keys(trackDiff.after).length === 0) return;
        await assertRecordingsUnlocked(tx, [recording.id]);
        const newIsrc = recDiff.after.isrc as string | null | undefined;
        if (newIsrc) {
          await assertIsrcFreeFor(tx, actor.organizationId, recording.id, newIsrc);
          await reserveOwnIsrc(tx, actor, recording.id, newIsrc);
        }
        // Every change bumps the recording's version, disc/side too: the track form names it.
        const updated = await tx
          .update(recordings)
          .set({ ...recDiff.after, version: recordingVersion + 1, updatedAt: new Date() })
          .where(and(eq(recordings.id, recording.id), eq(recordings.version, recordingVersion)))
          .returning({ id: recordings.id });
        if (updated.length === 0) throw staleRecording(recording.title);
        if (Object.keys(trackDiff.after).length > 0) {
          await tx
            .update(tracks)
            .set({ ...trackDiff.after, updatedAt: new Date() })
            .where(eq(tracks.id, track.id));
        }
        const changedKeys = Object.keys(recDiff.after);
        const action =
          changedKeys.length === 1 && changedKeys[0] === 'isrc'
            ? 'track.isrc.update'
            : changedKeys.length === 1 && changedKeys[0] === 'credits'
              ? 'track.credits.update'
              : 'track.metadata.update';
        await recordAudit(tx, {
          organizationId: actor.organizationId,
          releaseId,
          actorId: actor.userId,
          action,
          before: { trackId, title: recording.title, ...recDiff.before, ...trackDiff.before },
          after: { trackId, title: recording.title, ...recDiff.after, ...trackDiff.after },
        });
      }),
    );
  } catch (error) {
    if (isUniqueViolation(error)) {
      throw new ApiError(
        'conflict',
        'That ISRC already identifies another recording of the label; one ISRC identifies one recording.',
      );
    }
    throw error;
  }
  return reloadRelease(db, actor, releaseId);
}
