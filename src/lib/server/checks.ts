import { createHash, randomUUID } from 'node:crypto';
import { and, asc, desc, eq, inArray, isNotNull, max, notInArray } from 'drizzle-orm';
import type { AudioMeasurements } from '../audio/types';
import { type Database, isAppDatabase } from '../db/client';
import {
  artworks,
  audioFiles,
  checkRuns,
  member,
  recordings,
  releaseProfiles,
  releases,
  tracks,
  user,
} from '../db/schema';
import { enqueueMail, flushOutbox } from '../mail/outbox';
import { renderChecksFailedMail } from '../mail/templates';
import {
  checkReleaseAgainstProfiles,
  summarizeVerdicts,
  type Verdict,
} from '../specs/check-release';
import { type NormalizationPreview, previewNormalization } from '../specs/normalization';
import type { DeliveryProfile } from '../specs/schema';
import type { Finding, MeasurementsByTrack, ReleaseForCheck } from '../specs/types';
import { isEditable } from '../workflow/transitions';
import { recordAudit } from './audit';
import { getEnv } from './env';
import { ApiError } from './errors';
import { measurementsOf } from './measurements';
import { resolveProfiles } from './profiles';
import { appDataVersion, createReadCache } from './read-cache';
import type { Actor } from './route';

export interface CheckInputs {
  release: ReleaseForCheck;
  measurements: MeasurementsByTrack;
  profiles: DeliveryProfile[];
  /** Hash of everything the checks read: a stored run whose fingerprint differs is stale. */
  fingerprint: string;
  /** Hash of the audio files, order and gaps (what an audio sign-off covers). */
  audioFingerprint: string;
  /** Hash of the metadata the checks read (what a metadata sign-off covers). */
  metadataFingerprint: string;
  releaseVersion: number;
  trackTitles: { id: string; position: number; title: string; hasAudio: boolean }[];
}

/**
 * Check inputs by release, shared by every user's checks and progress panels until the
 * database changes (see read-cache.ts): after a commit the first reader gathers them again and
 * the others reuse them. Callers treat the result as read-only.
 */
const checkInputsCache = createReadCache<CheckInputs>({
  maxEntries: 200,
  ttlMs: 5_000,
  version: appDataVersion,
});

/** Gathers the release, its tracks' latest analysed audio and its target profiles. */
export function loadCheckInputs(
  db: Database,
  organizationId: string,
  releaseId: string,
): Promise<CheckInputs> {
  if (!isAppDatabase(db)) return gatherCheckInputs(db, organizationId, releaseId);
  return checkInputsCache.get(`${organizationId}\u0000${releaseId}`, () =>
    gatherCheckInputs(db, organizationId, releaseId),
  );
}

async function gatherCheckInputs(
  db: Database,
  organizationId: string,
  releaseId: string,
): Promise<CheckInputs> {
  const [release] = await db
    .select()
    .from(releases)
    .where(and(eq(releases.id, releaseId), eq(releases.organizationId, organizationId)))
    .limit(1);
  if (!release) throw new ApiError('not_found', 'No release with that id is visible to you.');

  const trackRows = await db
    .select({ track: tracks, recording: recordings })
    .from(tracks)
    .innerJoin(recordings, eq(recordings.id, tracks.recordingId))
    .where(eq(tracks.releaseId, releaseId))
    .orderBy(asc(tracks.position));
  const recordingIds = trackRows.map((r) => r.recording.id);

  // Each recording's newest file, in one query.
  const newest = db
    .select({
      recordingId: audioFiles.recordingId,
      fileVersion: max(audioFiles.fileVersion).as('newest_version'),
    })
    .from(audioFiles)
    .where(inArray(audioFiles.recordingId, recordingIds))
    .groupBy(audioFiles.recordingId)
    .as('newest');
  const fileRows = recordingIds.length
    ? await db
        .select({
          recordingId: audioFiles.recordingId,
          id: audioFiles.id,
          analysisState: audioFiles.analysisState,
          analyzedAt: audioFiles.analyzedAt,
        })
        .from(audioFiles)
        .innerJoin(
          newest,
          and(
            eq(newest.recordingId, audioFiles.recordingId),
            eq(newest.fileVersion, audioFiles.fileVersion),
          ),
        )
    : [];
  const files = new Map<string, { id: string; analysisState: string; analyzedAt: Date | null }>();
  for (const { recordingId, ...file } of fileRows) files.set(recordingId, file);

  const elsewhere = await db
    .select({ id: recordings.id, isrc: recordings.isrc })
    .from(recordings)
    .where(
      and(
        eq(recordings.organizationId, organizationId),
        isNotNull(recordings.isrc),
        recordingIds.length ? notInArray(recordings.id, recordingIds) : undefined,
      ),
    );
  // Only the codes this release uses matter to it; other releases' new codes must not make
  // its checks or sign-offs look out of date.
  const ownIsrcs = new Set(trackRows.map((r) => r.recording.isrc).filter(Boolean));
  const labelIsrcRecordings: Record<string, string[]> = {};
  for (const r of elsewhere.filter((e) => ownIsrcs.has(e.isrc))) {
    if (r.isrc) labelIsrcRecordings[r.isrc] = [...(labelIsrcRecordings[r.isrc] ?? []), r.id];
  }

  const [art] = await db
    .select()
    .from(artworks)
    .where(eq(artworks.releaseId, releaseId))
    .orderBy(desc(artworks.createdAt))
    .limit(1);

  const profileRows = await db
    .select({ id: releaseProfiles.profileId })
    .from(releaseProfiles)
    .where(eq(releaseProfiles.releaseId, releaseId))
    .orderBy(asc(releaseProfiles.profileId));
  const profiles = await resolveProfiles(
    db,
    organizationId,
    profileRows.map((p) => p.id),
  );

  const forCheck: ReleaseForCheck = {
    id: release.id,
    title: release.title,
    barcode: release.upcEan,
    tracks: trackRows.map(({ track, recording }) => ({
      id: track.id,
      recordingId: recording.id,
      position: track.position,
      disc: track.disc,
      side: track.side,
      title: recording.title,
      isrc: recording.isrc,
      credits: recording.credits,
      gapBeforeSeconds: track.gapBeforeFrames / 75,
      explicit: recording.explicit,
    })),
    artwork: art ? { widthPx: art.widthPx, heightPx: art.heightPx, format: art.format } : null,
    labelIsrcRecordings,
  };
  const measurements: Record<string, AudioMeasurements | null> = {};
  const audioIdentity: string[] = [];
  const done = [...files.values()].filter((f) => f.analysisState === 'done');
  const measured = await measurementsOf(db, done);
  for (const { track, recording } of trackRows) {
    const file = files.get(recording.id);
    measurements[track.id] =
      file?.analysisState === 'done' ? (measured.get(file.id) ?? null) : null;
    audioIdentity.push(file ? `${file.id}:${file.analysisState}` : '-');
  }
  const hash = (value: unknown) => createHash('sha256').update(JSON.stringify(value)).digest('hex');
  const profileIdentity = profiles.map((p) => [p.id, p.version, p.rules]);
  // What the engineer signs: the files, their order and the gaps between them.
  const audioFingerprint = hash({
    audioIdentity,
    layout: forCheck.tracks.map((t) => [t.id, t.position, t.disc, t.side, t.gapBeforeSeconds]),
    profileIdentity,
  });
  // What the coordinator signs: everything else the checks read.
  const metadataFingerprint = hash({ forCheck, profileIdentity });
  const fingerprint = hash([audioFingerprint, metadataFingerprint]);
  return {
    release: forCheck,
    measurements,
    profiles,
    fingerprint,
    audioFingerprint,
    metadataFingerprint,
    releaseVersion: release.version,
    trackTitles: trackRows.map(({ track, recording }) => ({
      id: track.id,
      position: track.position,
      title: recording.title,
      hasAudio: files.has(recording.id),
    })),
  };
}

export interface CheckSummary {
  failures: number;
  warnings: number;
  passes: number;
  fingerprint: string;
}

export interface CheckReport {
  run: { id: string; createdAt: string; releaseVersion: number; ranBy: string | null } | null;
  stale: boolean;
  profiles: { id: string; name: string }[];
  tracks: { id: string; position: number; title: string; hasAudio: boolean }[];
  findings: Finding[];
  verdicts: Verdict[];
  summary: Omit<CheckSummary, 'fingerprint'>;
  /** How loudness-normalising players would play the current masters (always fresh). */
  normalization: NormalizationPreview[];
}

function summarize(findings: readonly Finding[], fingerprint: string): CheckSummary {
  return {
    failures: findings.filter((f) => f.severity === 'failure').length,
    warnings: findings.filter((f) => f.severity === 'warning').length,
    passes: findings.filter((f) => f.severity === 'pass').length,
    fingerprint,
  };
}

function toReport(
  inputs: CheckInputs,
  run: CheckReport['run'],
  findings: Finding[],
  summary: CheckSummary,
): CheckReport {
  return {
    run,
    stale: run !== null && summary.fingerprint !== inputs.fingerprint,
    profiles: inputs.profiles.map((p) => ({ id: p.id, name: p.name })),
    tracks: inputs.trackTitles,
    findings,
    verdicts: summarizeVerdicts(findings),
    summary: { failures: summary.failures, warnings: summary.warnings, passes: summary.passes },
    normalization: previewNormalization(inputs.release, inputs.measurements),
  };
}

/** Runs every target profile's checks over the release and records the run. */
/** Runs every target profile's checks over the release and records the run. */
export async function runChecks(
  db: Database,
  actor: Actor,
  releaseId: string,
): Promise<CheckReport> {
  return recordCheckRun(db, actor.organizationId, releaseId, {
    id: actor.userId,
    name: actor.userName,
  });
}

/** Runs and records the checks; `ranBy` null means Quayside ran them (after an upload). */
async function recordCheckRun(
  db: Database,
  organizationId: string,
  releaseId: string,
  ranBy: { id: string; name: string } | null,
): Promise<CheckReport> {
  const inputs = await loadCheckInputs(db, organizationId, releaseId);
  if (inputs.profiles.length === 0) {
    throw new ApiError('conflict', 'Choose at least one target profile before running the checks.');
  }
  const findings = checkReleaseAgainstProfiles(
    inputs.profiles,
    inputs.release,
    inputs.measurements,
  );
  const summary = summarize(findings, inputs.fingerprint);
  const id = randomUUID();
  const createdAt = new Date();
  await db.insert(checkRuns).values({
    id,
    releaseId,
    releaseVersion: inputs.releaseVersion,
    findings,
    summary,
    ranBy: ranBy?.id ?? null,
    createdAt,
  });
  await recordAudit(db, {
    organizationId,
    releaseId,
    actorId: ranBy?.id ?? null,
    action: 'checks.run',
    after: {
      failures: summary.failures,
      warnings: summary.warnings,
      profiles: inputs.profiles.map((p) => p.id),
    },
  });
  return toReport(
    inputs,
    {
      id,
      createdAt: createdAt.toISOString(),
      releaseVersion: inputs.releaseVersion,
      ranBy: ranBy?.name ?? 'Quayside (after an upload)',
    },
    findings,
    summary,
  );
}

/**
 * After a new master of `recordingId` is analysed: re-runs the checks of every open release
 * that plays it, and e-mails the label's engineers and coordinators when a run fails.
 */
export async function rerunChecksAfterUpload(db: Database, recordingId: string): Promise<void> {
  const rows = await db
    .select({
      releaseId: releases.id,
      organizationId: releases.organizationId,
      title: releases.title,
      state: releases.state,
    })
    .from(tracks)
    .innerJoin(releases, eq(releases.id, tracks.releaseId))
    .where(eq(tracks.recordingId, recordingId));
  for (const row of rows) {
    if (!isEditable(row.state)) continue;
    const profileCount = await db
      .select({ id: releaseProfiles.profileId })
      .from(releaseProfiles)
      .where(eq(releaseProfiles.releaseId, row.releaseId));
    if (profileCount.length === 0) continue;
    const report = await recordCheckRun(db, row.organizationId, row.releaseId, null);
    if (report.summary.failures === 0) continue;
    const people = await db
      .select({ email: user.email })
      .from(member)
      .innerJoin(user, eq(user.id, member.userId))
      .where(
        and(
          eq(member.organizationId, row.organizationId),
          inArray(member.role, ['engineer', 'coordinator']),
        ),
      );
    const releaseUrl = new URL(`/releases/${row.releaseId}`, getEnv().BETTER_AUTH_URL).toString();
    await enqueueMail(
      db,
      row.organizationId,
      people.map((p) =>
        renderChecksFailedMail({
          to: p.email,
          releaseTitle: row.title,
          failures: report.summary.failures,
          warnings: report.summary.warnings,
          releaseUrl,
        }),
      ),
    );
    void flushOutbox(db).catch(() => undefined);
  }
}

/** The latest recorded run, marked stale when anything it read has changed since. */
export async function latestCheckReport(
  db: Database,
  actor: Actor,
  releaseId: string,
  /** The release's current inputs, when the caller has loaded them already. */
  loaded?: CheckInputs,
): Promise<CheckReport> {
  const inputs = loaded ?? (await loadCheckInputs(db, actor.organizationId, releaseId));
  const [row] = await db
    .select({ run: checkRuns, ranBy: user.name })
    .from(checkRuns)
    .leftJoin(user, eq(user.id, checkRuns.ranBy))
    .where(eq(checkRuns.releaseId, releaseId))
    .orderBy(desc(checkRuns.createdAt))
    .limit(1);
  if (!row) {
    return toReport(inputs, null, [], summarize([], inputs.fingerprint));
  }
  return toReport(
    inputs,
    {
      id: row.run.id,
      createdAt: row.run.createdAt.toISOString(),
      releaseVersion: row.run.releaseVersion,
      ranBy: row.run.ranBy === null ? 'Quayside (after an upload)' : row.ranBy,
    },
    row.run.findings as Finding[],
    row.run.summary as CheckSummary,
  );
}
