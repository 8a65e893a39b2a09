import { LRUCache } from 'lru-cache';
import { type DataVersion, watchDataVersion } from '../db/data-version';
import { getEnv } from './env';

/**
 * Answers that depend only on the database, kept in memory until the database changes.
 *
 * Every entry is tagged with the database's data version (see `db/data-version.ts`) read
 * *before* the answer was computed, plus an optional tag for state that lives outside the
 * database (analysis progress). A lookup hits only when the tags still match, so a commit by
 * anyone, in this process or another, makes every older entry unreachable at once; no write
 * path has to remember to invalidate anything. Entries also expire after `ttlMs`, a bound on
 * anything time-dependent an answer might come to hold. Concurrent misses
 * for the same key share one computation.
 *
 * A key must name who may share the answer as well as what it is (see `cachedJson` in
 * route.ts), so an answer shaped by permissions is never handed to someone else.
 */
export interface ReadCache<V extends object> {
  get(key: string, compute: () => Promise<V>, liveTag?: string): Promise<V>;
  /** Counts since start (for tests). */
  stats(): { hits: number; misses: number };
}

export interface ReadCacheOptions<V> {
  maxEntries: number;
  ttlMs: number;
  /** With `maxSize`: an entry's size (e.g. its length in characters), to bound the memory. */
  sizeOf?: (value: V) => number;
  maxSize?: number;
  /** Where to read the data version; null (a remote database) turns caching off. */
  version: () => DataVersion | null;
}

interface Entry<V> {
  tag: string;
  value: V;
}

export function createReadCache<V extends object>(options: ReadCacheOptions<V>): ReadCache<V> {
  const { sizeOf, maxSize } = options;
  const entries = new LRUCache<string, Entry<V>>({
    max: options.maxEntries,
    ttl: options.ttlMs,
    ...(sizeOf && maxSize
      ? { maxSize, sizeCalculation: (entry: Entry<V>) => Math.max(1, sizeOf(entry.value)) }
      : {}),
  });
  const inFlight = new Map<string, Promise<V>>();
  let hits = 0;
  let misses = 0;

  return {
    async get(key, compute, liveTag = '') {
      const version = options.version();
      if (!version) return compute();
      const tag = `${version.current()}|${liveTag}`;
      const entry = entries.get(key);
      if (entry?.tag === tag) {
        hits += 1;
        return entry.value;
      }
      misses += 1;
      const flightKey = `${tag}\u0000${key}`;
      const pending = inFlight.get(flightKey);
      if (pending) return pending;
      const computing = compute()
        .then((value) => {
          entries.set(key, { tag, value });
          return value;
        })
        .finally(() => inFlight.delete(flightKey));
      inFlight.set(flightKey, computing);
      return computing;
    },
    stats: () => ({ hits, misses }),
  };
}

let watch: DataVersion | null | undefined;

/**
 * The data version of the app's database (DATABASE_URL), opened on first use; null, so nothing
 * is cached, when QUAYSIDE_READ_CACHE is off or the database is not a local file.
 */
export function appDataVersion(): DataVersion | null {
  if (watch === undefined) {
    const env = getEnv();
    watch = env.QUAYSIDE_READ_CACHE === 'off' ? null : watchDataVersion(env.DATABASE_URL);
  }
  return watch;
}
