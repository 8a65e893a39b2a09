import { and, asc, eq } from 'drizzle-orm';
import type { LayoutUpdate } from '../../api/metadata-schemas';
import type { ReleaseDetail } from '../../api/schemas';
import type { Database } from '../../db/client';
import { recordings, releases, tracks } from '../../db/schema';
import { recordAudit } from '../audit';
import { ApiError } from '../errors';
import type { Actor } from '../route';
import {
  assertUnlocked,
  loadReleaseRow,
  reloadRelease,
  staleRelease,
  withWriteLock,
} from './common';

/**
 * Sets the running order and each track's gap. The request lists every track of the release
 * exactly once, in the new order; `version` is the release version the client read.
 */
export async function updateLayout(
  db: Database,
  actor: Actor,
  releaseId: string,
  layout: LayoutUpdate,
): Promise<ReleaseDetail> {
  await withWriteLock(() =>
    db.transaction(async (tx) => {
      const release = await loadReleaseRow(tx, actor, releaseId);
      assertUnlocked(release);
      if (release.version !== layout.version) throw staleRelease();
      const current = await tx
        .select({
          id: tracks.id,
          position: tracks.position,
          gapBeforeFrames: tracks.gapBeforeFrames,
          title: recordings.title,
        })
        .from(tracks)
        .innerJoin(recordings, eq(recordings.id, tracks.recordingId))
        .where(eq(tracks.releaseId, releaseId))
        .orderBy(asc(tracks.position));
      const byId = new Map(current.map((t) => [t.id, t]));
      const seen = new Set<string>();
      const issues: { path: string; message: string }[] = [];
      layout.tracks.forEach((t, i) => {
        if (!byId.has(t.id)) {
          issues.push({
            path: `tracks.${i}.id`,
            message: 'This release has no track with that id.',
          });
        } else if (seen.has(t.id)) {
          issues.push({ path: `tracks.${i}.id`, message: 'This track is listed twice.' });
        }
        seen.add(t.id);
      });
      if (issues.length === 0 && seen.size !== current.length) {
        issues.push({
          path: 'tracks',
          message: `List every track of the release once: it has ${current.length}, the request names ${seen.size}.`,
        });
      }
      if (issues.length > 0) {
        throw new ApiError('invalid_request', 'The running order is not valid.', issues);
      }
      const orderBefore = current.map((t) => t.id);
      const orderAfter = layout.tracks.map((t) => t.id);
      const orderChanged = orderBefore.join() !== orderAfter.join();
      const gapChanges = layout.tracks.filter(
        (t) => byId.get(t.id)!.gapBeforeFrames !== t.gapBeforeFrames,
      );
      if (!orderChanged && gapChanges.length === 0) return;

      const bumped = await tx
        .update(releases)
        .set({ version: layout.version + 1, updatedAt: new Date() })
        .where(and(eq(releases.id, releaseId), eq(releases.version, layout.version)))
        .returning({ id: releases.id });
      if (bumped.length === 0) throw staleRelease();
      for (const [index, t] of layout.tracks.entries()) {
        const before = byId.get(t.id)!;
        if (before.position === index + 1 && before.gapBeforeFrames === t.gapBeforeFrames) continue;
        await tx
          .update(tracks)
          .set({ position: index + 1, gapBeforeFrames: t.gapBeforeFrames, updatedAt: new Date() })
          .where(eq(tracks.id, t.id));
      }
      const audit = { organizationId: actor.organizationId, releaseId, actorId: actor.userId };
      if (orderChanged) {
        const titles = (ids: string[]) =>
          ids.map((id) => ({ trackId: id, title: byId.get(id)!.title }));
        await recordAudit(tx, {
          ...audit,
          action: 'release.order.update',
          before: titles(orderBefore),
          after: titles(orderAfter),
        });
      }
      if (gapChanges.length > 0) {
        await recordAudit(tx, {
          ...audit,
          action: 'release.gaps.update',
          before: gapChanges.map((t) => ({
            trackId: t.id,
            title: byId.get(t.id)!.title,
            gapBeforeFrames: byId.get(t.id)!.gapBeforeFrames,
          })),
          after: gapChanges.map((t) => ({
            trackId: t.id,
            title: byId.get(t.id)!.title,
            gapBeforeFrames: t.gapBeforeFrames,
          })),
        });
      }
    }),
  );
  return reloadRelease(db, actor, releaseId);
}
