/** What the upload panel and the track page read: files per track, uploads, measurements. */
import { and, asc, desc, eq, getTableColumns, inArray } from 'drizzle-orm';
import type { AudioFileVersion, TrackDetail, UploadStatus } from '../../api/schemas';
import type { AudioMeasurements } from '../../audio/types';
import { can } from '../../auth/permissions';
import type { Database } from '../../db/client';
import {
  audioFiles,
  recordings,
  releaseProfiles,
  releases,
  tracks,
  uploads,
  user,
} from '../../db/schema';
import { findBuiltInProfile } from '../../specs/profiles';
import type { Actor } from '../route';
import { getAnalysisProgress } from './analysis-queue';

type AudioRow = typeof audioFiles.$inferSelect;

function toVersion(row: AudioRow, uploaderName: string | null): AudioFileVersion {
  return {
    id: row.id,
    fileVersion: row.fileVersion,
    originalName: row.originalName,
    sizeBytes: row.sizeBytes,
    sha256: row.sha256,
    sampleRateHz: row.sampleRateHz,
    bitsPerSample: row.bitsPerSample,
    channels: row.channels,
    durationSeconds:
      row.durationSamples != null && row.sampleRateHz
        ? row.durationSamples / row.sampleRateHz
        : null,
    analysisState: row.analysisState,
    analysisError: row.analysisError,
    analysisProgress: row.analysisState === 'running' ? getAnalysisProgress(row.id) : null,
    uploadedBy: uploaderName,
    uploadedAt: row.createdAt.toISOString(),
  };
}

/** Every file version of the given recordings, newest first, without measurements. */
async function loadVersions(db: Database, recordingIds: string[]) {
  if (recordingIds.length === 0) return new Map<string, AudioFileVersion[]>();
  const { measurements: _skip, ...columns } = getTableColumns(audioFiles);
  const rows = await db
    .select({ audio: columns, uploader: user.name })
    .from(audioFiles)
    .leftJoin(user, eq(user.id, audioFiles.uploadedBy))
    .where(inArray(audioFiles.recordingId, recordingIds))
    .orderBy(desc(audioFiles.fileVersion));
  const byRecording = new Map<string, AudioFileVersion[]>();
  for (const { audio, uploader } of rows) {
    const list = byRecording.get(audio.recordingId) ?? [];
    list.push(toVersion({ ...audio, measurements: null }, uploader));
    byRecording.set(audio.recordingId, list);
  }
  return byRecording;
}

/** The release's id when it belongs to the actor's organisation, else null. */
export async function findOwnRelease(db: Database, actor: Actor, releaseId: string) {
  const [row] = await db
    .select({ id: releases.id, title: releases.title })
    .from(releases)
    .where(and(eq(releases.id, releaseId), eq(releases.organizationId, actor.organizationId)))
    .limit(1);
  return row ?? null;
}

/** Each track's current file and analysis state, and the release's last 20 uploads. */
export async function getUploadStatus(
  db: Database,
  releaseId: string,
  maxUploadBytes: number,
): Promise<UploadStatus> {
  const trackRows = await db
    .select({
      id: tracks.id,
      position: tracks.position,
      recordingId: tracks.recordingId,
      title: recordings.title,
    })
    .from(tracks)
    .innerJoin(recordings, eq(recordings.id, tracks.recordingId))
    .where(eq(tracks.releaseId, releaseId))
    .orderBy(asc(tracks.position));
  const versions = await loadVersions(
    db,
    trackRows.map((t) => t.recordingId),
  );
  const uploadRows = await db
    .select()
    .from(uploads)
    .where(eq(uploads.releaseId, releaseId))
    .orderBy(desc(uploads.createdAt))
    .limit(20);
  return {
    maxUploadBytes,
    tracks: trackRows.map((t) => {
      const list = versions.get(t.recordingId) ?? [];
      return {
        id: t.id,
        position: t.position,
        title: t.title,
        current: list[0] ?? null,
        versionCount: list.length,
      };
    }),
    uploads: uploadRows.map((u) => ({
      id: u.id,
      originalName: u.originalName,
      state: u.state,
      bytesReceived: u.bytesReceived,
      sizeBytes: u.sizeBytes,
      error: u.error,
      trackId: u.trackId,
      audioFileId: u.audioFileId,
      createdAt: u.createdAt.toISOString(),
    })),
  };
}

/** Loudness band and true-peak ceiling from the first of the release's profiles that sets them. */
async function loadTargets(db: Database, releaseId: string) {
  const rows = await db
    .select({ profileId: releaseProfiles.profileId })
    .from(releaseProfiles)
    .where(eq(releaseProfiles.releaseId, releaseId))
    .orderBy(asc(releaseProfiles.profileId));
  let loudnessTarget: TrackDetail['loudnessTarget'] = null;
  let truePeakCeiling: TrackDetail['truePeakCeiling'] = null;
  for (const { profileId } of rows) {
    const profile = findBuiltInProfile(profileId);
    if (!profile) continue;
    const loudness = profile.rules.integratedLoudness;
    if (!loudnessTarget && loudness) {
      const min =
        loudness.targetLufs !== undefined
          ? loudness.targetLufs - (loudness.toleranceLu ?? 0)
          : loudness.minLufs;
      const max =
        loudness.targetLufs !== undefined
          ? loudness.targetLufs + (loudness.toleranceLu ?? 0)
          : loudness.maxLufs;
      if (min !== undefined || max !== undefined) {
        loudnessTarget = {
          profileName: profile.name,
          minLufs: min ?? (max as number) - 10,
          maxLufs: max ?? 0,
        };
      }
    }
    if (!truePeakCeiling && profile.rules.truePeak) {
      truePeakCeiling = {
        profileName: profile.name,
        ceilingDbtp: profile.rules.truePeak.ceilingDbtp,
      };
    }
  }
  return { loudnessTarget, truePeakCeiling };
}

/** A track of a release in the actor's organisation, with its file versions; null if none. */
export async function getTrackDetail(
  db: Database,
  actor: Actor,
  trackId: string,
): Promise<TrackDetail | null> {
  const [row] = await db
    .select({ track: tracks, recording: recordings, release: releases })
    .from(tracks)
    .innerJoin(recordings, eq(recordings.id, tracks.recordingId))
    .innerJoin(releases, eq(releases.id, tracks.releaseId))
    .where(and(eq(tracks.id, trackId), eq(releases.organizationId, actor.organizationId)))
    .limit(1);
  if (!row) return null;
  const versions = (await loadVersions(db, [row.recording.id])).get(row.recording.id) ?? [];
  const current = versions[0] ?? null;
  let measurements: AudioMeasurements | null = null;
  if (current?.analysisState === 'done') {
    const [m] = await db
      .select({ measurements: audioFiles.measurements })
      .from(audioFiles)
      .where(eq(audioFiles.id, current.id))
      .limit(1);
    measurements = (m?.measurements as AudioMeasurements | null) ?? null;
  }
  return {
    track: {
      id: row.track.id,
      position: row.track.position,
      title: row.recording.title,
      artist: row.recording.artist,
      isrc: row.recording.isrc,
      releaseId: row.release.id,
      releaseTitle: row.release.title,
    },
    ...(await loadTargets(db, row.release.id)),
    current,
    measurements,
    versions,
    canUpload: can(actor.role, 'audio:upload'),
  };
}

/** An audio file of the actor's organisation (for playback and download), or null. */
export async function findOwnAudioFile(db: Database, actor: Actor, audioFileId: string) {
  const [row] = await db
    .select({
      id: audioFiles.id,
      objectKey: audioFiles.objectKey,
      sizeBytes: audioFiles.sizeBytes,
      originalName: audioFiles.originalName,
    })
    .from(audioFiles)
    .innerJoin(recordings, eq(recordings.id, audioFiles.recordingId))
    .where(and(eq(audioFiles.id, audioFileId), eq(recordings.organizationId, actor.organizationId)))
    .limit(1);
  return row ?? null;
}
