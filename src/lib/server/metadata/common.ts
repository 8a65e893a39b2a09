import { and, eq, inArray } from 'drizzle-orm';
import { LOCKED_RELEASE_STATES } from '../../api/metadata-schemas';
import type { ReleaseDetail } from '../../api/schemas';
import type { Database, Tx } from '../../db/client';
import { releases, tracks } from '../../db/schema';
import { ApiError } from '../errors';
import { getRelease } from '../releases';
import type { Actor } from '../route';

export type ReleaseRow = typeof releases.$inferSelect;
export type { Tx };

const stateWords: Record<string, string> = {
  approved: 'approved',
  packaged: 'packaged',
  delivered: 'delivered',
};

/** True when the release's state forbids edits until it is reopened. */
export function isLockedState(state: string): boolean {
  return (LOCKED_RELEASE_STATES as readonly string[]).includes(state);
}

/** Throws 409 when the release is approved, packaged or delivered. */
export function assertUnlocked(release: Pick<ReleaseRow, 'state' | 'title'>): void {
  if (isLockedState(release.state)) {
    throw new ApiError(
      'conflict',
      `“${release.title}” is ${stateWords[release.state]}, so its metadata is locked; reopen it first to change anything.`,
    );
  }
}

/**
 * The release row when it belongs to the actor's organisation (editors see every release of
 * their label); 404 otherwise, so other labels' releases do not leak.
 */
export async function loadReleaseRow(
  db: Database | Tx,
  actor: Actor,
  releaseId: string,
): Promise<ReleaseRow> {
  const [row] = await db
    .select()
    .from(releases)
    .where(and(eq(releases.id, releaseId), eq(releases.organizationId, actor.organizationId)))
    .limit(1);
  if (!row) throw new ApiError('not_found', 'No release with that id is visible to you.');
  return row;
}

/** Throws 409 when any release holding one of these recordings is locked. */
export async function assertRecordingsUnlocked(
  db: Database | Tx,
  recordingIds: string[],
): Promise<void> {
  if (recordingIds.length === 0) return;
  const rows = await db
    .selectDistinct({ title: releases.title, state: releases.state })
    .from(tracks)
    .innerJoin(releases, eq(releases.id, tracks.releaseId))
    .where(inArray(tracks.recordingId, recordingIds));
  const locked = rows.find((r) => isLockedState(r.state));
  if (locked) {
    throw new ApiError(
      'conflict',
      `This recording is also on “${locked.title}”, which is ${stateWords[locked.state]}; reopen that release first to change the recording.`,
    );
  }
}

/** The release as the API returns it, after a change. */
export async function reloadRelease(
  db: Database,
  actor: Actor,
  releaseId: string,
): Promise<ReleaseDetail> {
  const release = await getRelease(db, actor, releaseId);
  if (!release) throw new ApiError('not_found', 'No release with that id is visible to you.');
  return release;
}

export function staleRelease(): ApiError {
  return new ApiError(
    'conflict',
    'Someone else changed this release since you loaded it. Reload to see their changes; your typed values are kept in the form.',
  );
}

export function staleRecording(title: string): ApiError {
  return new ApiError(
    'conflict',
    `Someone else changed “${title}” since you loaded it. Reload to see their changes; your typed values are kept in the form.`,
  );
}

let queue: Promise<unknown> = Promise.resolve();

/**
 * Runs `work` after every earlier metadata write of this process has finished. SQLite takes
 * one writer at a time anyway; queueing here turns "database is locked" into waiting. The
 * unique indexes remain the guard across processes.
 */
export function withWriteLock<T>(work: () => Promise<T>): Promise<T> {
  const run = queue.then(work, work);
  queue = run.catch(() => undefined);
  return run;
}

/** Values compared as JSON; used to record only the fields that changed. */
export function diffFields<T extends Record<string, unknown>>(
  before: T,
  after: Partial<T>,
): { before: Partial<T>; after: Partial<T> } {
  const b: Partial<T> = {};
  const a: Partial<T> = {};
  for (const key of Object.keys(after) as (keyof T)[]) {
    if (after[key] === undefined) continue;
    if (JSON.stringify(before[key] ?? null) !== JSON.stringify(after[key] ?? null)) {
      b[key] = before[key];
      a[key] = after[key];
    }
  }
  return { before: b, after: a };
}
