/** Fixture releases for the metadata tests, inserted straight into the test database. */
import type { Database } from '@/lib/db/client';
import { recordings, releases, tracks } from '@/lib/db/schema';

export const orgId = 'org-brackwater';

export interface FixtureTrack {
  title: string;
  isrc?: string | null;
  /** Reuse an existing recording instead of creating one. */
  recordingId?: string;
  gapBeforeFrames?: number;
}

/** Inserts a release of the demo label with one recording per track; returns the ids. */
export async function createFixtureRelease(
  db: Database,
  id: string,
  fixture: {
    state?: 'draft' | 'in_review' | 'approved' | 'packaged' | 'delivered' | 'returned';
    tracks: FixtureTrack[];
  },
): Promise<{ releaseId: string; trackIds: string[]; recordingIds: string[] }> {
  await db.insert(releases).values({
    id,
    organizationId: orgId,
    title: `Fixture ${id}`,
    artist: 'Fixture Artist',
    labelName: 'Brackwater Sound',
    state: fixture.state ?? 'draft',
  });
  const trackIds: string[] = [];
  const recordingIds: string[] = [];
  for (const [i, t] of fixture.tracks.entries()) {
    const recordingId = t.recordingId ?? `rec-${id}-${i + 1}`;
    if (!t.recordingId) {
      await db.insert(recordings).values({
        id: recordingId,
        organizationId: orgId,
        title: t.title,
        artist: 'Fixture Artist',
        isrc: t.isrc ?? null,
        credits: [{ name: 'Fixture Composer', role: 'composer' }],
      });
    }
    const trackId = `trk-${id}-${i + 1}`;
    await db.insert(tracks).values({
      id: trackId,
      releaseId: id,
      recordingId,
      position: i + 1,
      gapBeforeFrames: t.gapBeforeFrames ?? 150,
    });
    trackIds.push(trackId);
    recordingIds.push(recordingId);
  }
  return { releaseId: id, trackIds, recordingIds };
}
