import { and, eq, ne } from 'drizzle-orm';
import type { Database } from '../../db/client';
import { isrcAllocations, recordings, releases, tracks } from '../../db/schema';
import { formatIsrc } from '../../identifiers/isrc';
import { ApiError } from '../errors';
import type { Tx } from './common';

/**
 * Throws 409 when `isrc` already identifies another recording of the label, or was handed
 * out to another recording by Quayside (codes are never reused, even after a delete).
 * ISO 3901: one ISRC per recording; the same recording on two releases keeps its ISRC.
 */
export async function assertIsrcFreeFor(
  db: Database | Tx,
  organizationId: string,
  recordingId: string,
  isrc: string,
): Promise<void> {
  const [other] = await db
    .select({ id: recordings.id, title: recordings.title })
    .from(recordings)
    .where(
      and(
        eq(recordings.organizationId, organizationId),
        eq(recordings.isrc, isrc),
        ne(recordings.id, recordingId),
      ),
    )
    .limit(1);
  if (other) {
    const [on] = await db
      .select({ title: releases.title })
      .from(tracks)
      .innerJoin(releases, eq(releases.id, tracks.releaseId))
      .where(eq(tracks.recordingId, other.id))
      .limit(1);
    throw new ApiError(
      'conflict',
      `ISRC ${formatIsrc(isrc)} already identifies “${other.title}”${on ? ` on “${on.title}”` : ''}. One ISRC identifies one recording: give this one its own code, or use that recording on this release.`,
    );
  }
  const [allocated] = await db
    .select({ recordingId: isrcAllocations.recordingId })
    .from(isrcAllocations)
    .where(and(eq(isrcAllocations.organizationId, organizationId), eq(isrcAllocations.isrc, isrc)))
    .limit(1);
  if (allocated && allocated.recordingId !== recordingId) {
    throw new ApiError(
      'conflict',
      `ISRC ${formatIsrc(isrc)} was handed out to another recording before; an ISRC is never reused. Allocate a new one instead.`,
    );
  }
}

/** True for SQLite's unique-constraint failure (the last guard behind the checks above). */
export function isUniqueViolation(error: unknown): boolean {
  let e: unknown = error;
  for (let i = 0; i < 4 && e; i += 1) {
    const message = (e as { message?: string }).message ?? '';
    if (/UNIQUE constraint failed/i.test(message)) return true;
    e = (e as { cause?: unknown }).cause;
  }
  return false;
}
