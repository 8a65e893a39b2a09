/**
 * Parsed measurements of analysed files, kept in memory. A file's measurements are written
 * once, when its analysis finishes (keyed here by file id and analysis time), and each is
 * a 35 KB JSON document with loudness and peak series: parsing them again for every page
 * request cost more than the rest of the request together.
 */
import { inArray } from 'drizzle-orm';
import type { AudioMeasurements } from '../audio/types';
import type { Database } from '../db/client';
import { audioFiles } from '../db/schema';

const limit = 500;
const cache = new Map<string, AudioMeasurements | null>();

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
    const key = keyOf(file);
    if (cache.has(key)) {
      const value = cache.get(key) ?? null;
      // Refresh its place: the map's order is least recently used first.
      cache.delete(key);
      cache.set(key, value);
      found.set(file.id, value);
    } else missing.push(file.id);
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
      if (row.analyzedAt) cache.set(keyOf(row), value);
    }
    while (cache.size > limit) cache.delete(cache.keys().next().value as string);
  }
  return found;
}
