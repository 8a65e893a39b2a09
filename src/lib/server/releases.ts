import { and, asc, desc, eq, inArray, max, sql } from 'drizzle-orm';
import type { ReleaseDetail, ReleaseSummary, Track } from '../api/schemas';
import { seesOnlySharedReleases } from '../auth/permissions';
import type { Database } from '../db/client';
import {
  audioFiles,
  recordings,
  releaseProfiles,
  releaseShares,
  releases,
  tracks,
} from '../db/schema';
import { profileNames } from './profiles';
import type { Actor } from './route';

/** Condition limiting releases to what `actor` may see: their organisation, and for
 * distributors only what was shared with them. */
function visibleTo(actor: Actor) {
  const inOrg = eq(releases.organizationId, actor.organizationId);
  if (!seesOnlySharedReleases(actor.role)) return inOrg;
  return and(inOrg, inArray(releases.id, sqlSharedWith(actor.userId)));
}

function sqlSharedWith(userId: string) {
  return sql`(select ${releaseShares.releaseId} from ${releaseShares} where ${releaseShares.userId} = ${userId})`;
}

type ReleaseRow = typeof releases.$inferSelect;

/** Target profiles of each release, with names (built-in or the label's own). */
async function loadProfiles(db: Database, organizationId: string, releaseIds: string[]) {
  const byRelease = new Map<string, { id: string; name: string }[]>();
  if (releaseIds.length === 0) return byRelease;
  const rows = await db
    .select()
    .from(releaseProfiles)
    .where(inArray(releaseProfiles.releaseId, releaseIds))
    .orderBy(asc(releaseProfiles.profileId));
  const names = await profileNames(db, organizationId, [...new Set(rows.map((r) => r.profileId))]);
  for (const row of rows) {
    const list = byRelease.get(row.releaseId) ?? [];
    // An id that no longer resolves is shown as it is.
    list.push({ id: row.profileId, name: names.get(row.profileId) ?? row.profileId });
    byRelease.set(row.releaseId, list);
  }
  return byRelease;
}

function toSummary(
  row: ReleaseRow,
  profiles: { id: string; name: string }[],
  trackCount: number,
  totalDurationSeconds: number | null,
): ReleaseSummary {
  return {
    id: row.id,
    title: row.title,
    artist: row.artist,
    labelName: row.labelName,
    catalogueNumber: row.catalogueNumber,
    upcEan: row.upcEan,
    releaseDate: row.releaseDate,
    state: row.state,
    profiles,
    trackCount,
    totalDurationSeconds,
    updatedAt: row.updatedAt.toISOString(),
    version: row.version,
  };
}

/** Releases the actor may see, most recently changed first. */
export async function listReleases(db: Database, actor: Actor): Promise<ReleaseSummary[]> {
  const rows = await db
    .select()
    .from(releases)
    .where(visibleTo(actor))
    .orderBy(desc(releases.updatedAt), asc(releases.title));
  const ids = rows.map((r) => r.id);
  const profiles = await loadProfiles(db, actor.organizationId, ids);
  const counts = new Map<string, { count: number; seconds: number | null }>();
  if (ids.length > 0) {
    const trackRows = await loadTracks(db, ids);
    for (const t of trackRows) {
      const entry = counts.get(t.releaseId) ?? { count: 0, seconds: 0 };
      entry.count += 1;
      const seconds = t.audio?.durationSeconds;
      entry.seconds = entry.seconds === null || seconds == null ? null : entry.seconds + seconds;
      counts.set(t.releaseId, entry);
    }
  }
  return rows.map((row) => {
    const c = counts.get(row.id);
    return toSummary(row, profiles.get(row.id) ?? [], c?.count ?? 0, c ? c.seconds : null);
  });
}

/** Whether the actor may see the release (one query; `getRelease` when its data is wanted). */
export async function isReleaseVisible(
  db: Database,
  actor: Actor,
  releaseId: string,
): Promise<boolean> {
  const [row] = await db
    .select({ id: releases.id })
    .from(releases)
    .where(and(eq(releases.id, releaseId), visibleTo(actor)))
    .limit(1);
  return row !== undefined;
}

/** One release with its tracks, or null when it does not exist or the actor may not see it. */
export async function getRelease(
  db: Database,
  actor: Actor,
  releaseId: string,
): Promise<ReleaseDetail | null> {
  const [row] = await db
    .select()
    .from(releases)
    .where(and(eq(releases.id, releaseId), visibleTo(actor)))
    .limit(1);
  if (!row) return null;
  const profiles = await loadProfiles(db, actor.organizationId, [row.id]);
  const trackRows = await loadTracks(db, [row.id]);
  const seconds = trackRows.reduce<number | null>(
    (sum, t) =>
      sum === null || t.audio?.durationSeconds == null ? null : sum + t.audio.durationSeconds,
    0,
  );
  return {
    ...toSummary(
      row,
      profiles.get(row.id) ?? [],
      trackRows.length,
      trackRows.length ? seconds : null,
    ),
    originalReleaseDate: row.originalReleaseDate,
    genre: row.genre,
    language: row.language,
    pLine: row.pLine,
    cLine: row.cLine,
    explicit: row.explicit,
    tracks: trackRows.map(({ releaseId: _ignored, ...track }) => track),
  };
}

async function loadTracks(
  db: Database,
  releaseIds: string[],
): Promise<(Track & { releaseId: string })[]> {
  const latest = db
    .select({
      recordingId: audioFiles.recordingId,
      fileVersion: max(audioFiles.fileVersion).as('v'),
    })
    .from(audioFiles)
    .groupBy(audioFiles.recordingId)
    .as('latest');
  const rows = await db
    .select({
      track: tracks,
      recording: recordings,
      // Not the measurements: a large JSON document per file that the list does not show.
      audio: {
        id: audioFiles.id,
        fileVersion: audioFiles.fileVersion,
        originalName: audioFiles.originalName,
        sizeBytes: audioFiles.sizeBytes,
        sha256: audioFiles.sha256,
        sampleRateHz: audioFiles.sampleRateHz,
        bitsPerSample: audioFiles.bitsPerSample,
        channels: audioFiles.channels,
        durationSamples: audioFiles.durationSamples,
        analysisState: audioFiles.analysisState,
      },
    })
    .from(tracks)
    .innerJoin(recordings, eq(recordings.id, tracks.recordingId))
    .leftJoin(latest, eq(latest.recordingId, tracks.recordingId))
    .leftJoin(
      audioFiles,
      and(
        eq(audioFiles.recordingId, latest.recordingId),
        eq(audioFiles.fileVersion, latest.fileVersion),
      ),
    )
    .where(inArray(tracks.releaseId, releaseIds))
    .orderBy(asc(tracks.releaseId), asc(tracks.position));
  return rows.map(({ track, recording, audio }) => ({
    releaseId: track.releaseId,
    id: track.id,
    position: track.position,
    disc: track.disc,
    side: track.side,
    gapBeforeFrames: track.gapBeforeFrames,
    recordingId: recording.id,
    recordingVersion: recording.version,
    title: recording.title,
    versionTitle: recording.versionTitle,
    artist: recording.artist,
    isrc: recording.isrc,
    iswc: recording.iswc,
    explicit: recording.explicit,
    credits: recording.credits,
    audio: audio
      ? {
          audioFileId: audio.id,
          fileVersion: audio.fileVersion,
          originalName: audio.originalName,
          sizeBytes: audio.sizeBytes,
          sha256: audio.sha256,
          sampleRateHz: audio.sampleRateHz,
          bitsPerSample: audio.bitsPerSample,
          channels: audio.channels,
          durationSeconds:
            audio.durationSamples != null && audio.sampleRateHz
              ? audio.durationSamples / audio.sampleRateHz
              : null,
          analysisState: audio.analysisState,
        }
      : null,
  }));
}
