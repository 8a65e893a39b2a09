/**
 * Parsed measurements of analysed files, kept in memory. A file's measurements are written
 * once, when its analysis finishes (keyed here by file id and analysis time), and each is
 * a 35 KB JSON document with loudness and peak series: parsing them again for every page
 * request cost more than the rest of the request together.
 */
import { inArray } from 'drizzle-orm';
import { LRUCache } from 'lru-cache';
import type { AudioMeasurements } from '../audio/types';
import type { Database } from '../db/client';
import { audioFiles } from '../db/schema';

/** Measurements (null for a file without any) by file id and analysis time; 500 at most. */
const cache = new LRUCache<string, { value: AudioMeasurements | null }>({ max: 500 });

const keyOf = (file: { id: string; analyzedAt: Date | null }) =>
  `${file.id}@${file.analyzedAt?.getTime() ?? 0}`;

/** Measurements of each analysed file, by file id (null for a file without any). */
export async function measurementsOf(
  db: Database,
  files: { id: string; analyzedAt: Date | null }[],
): Promise<Map<string, AudioMeasurements | null>> {
  const found = new Map<string, AudioMeasurements | null>();
  const missing: string[] = [];
  for (const file of files) {
    const hit = cache.get(keyOf(file));
    if (hit) found.set(file.id, hit.value);
    else missing.push(file.id);
  }
  if (missing.length) {
    const rows = await db
      .select({
        id: audioFiles.id,
        analyzedAt: audioFiles.analyzedAt,
        measurements: audioFiles.measurements,
      })
      .from(audioFiles)
      .where(inArray(audioFiles.id, missing));
    for (const row of rows) {
      const value = (row.measurements as AudioMeasurements | null) ?? null;
      found.set(row.id, value);
      if (row.analyzedAt) cache.set(keyOf(row), { value });
    }
  }
  return found;
}
