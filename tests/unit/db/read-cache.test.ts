/**
 * The read cache's promise: an answer is served again only while nothing has been committed
 * to the database since it was computed, by this process or another. Real SQLite files in a
 * temporary folder; writes through our own client (its pool and transactions) and through a
 * second, independent client as another process would.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { createClient } from '@libsql/client';
import { afterAll, describe, expect, it } from 'vitest';
import { databaseFilePath, watchDataVersion } from '@/lib/db/data-version';
import { createReadCache } from '@/lib/server/read-cache';

const dir = mkdtempSync(join(tmpdir(), 'quayside-read-cache-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

async function freshDatabase(name: string) {
  const url = pathToFileURL(join(dir, `${name}.db`)).href;
  const client = createClient({ url });
  await client.execute('PRAGMA journal_mode=WAL');
  await client.execute('CREATE TABLE item (id INTEGER PRIMARY KEY, name TEXT NOT NULL)');
  await client.execute("INSERT INTO item (name) VALUES ('first')");
  const watch = watchDataVersion(url);
  if (!watch) throw new Error('a file database must be watchable');
  return { url, client, watch };
}

describe('databaseFilePath', () => {
  it('names the file of a local URL and nothing for remote or in-memory ones', () => {
    expect(databaseFilePath('file:./data/quayside.db')).toBe('./data/quayside.db');
    expect(databaseFilePath('file:///tmp/a%20b.db')).toBe('/tmp/a b.db');
    expect(databaseFilePath('file:/tmp/x.db?mode=rwc')).toBe('/tmp/x.db');
    expect(databaseFilePath('file::memory:')).toBeNull();
    expect(databaseFilePath('libsql://example.invalid')).toBeNull();
    expect(databaseFilePath('http://127.0.0.1:8080')).toBeNull();
  });
});

describe('data version', () => {
  it('stays while only reads happen and moves on every commit, from any connection', async () => {
    const { url, client, watch } = await freshDatabase('version');
    const start = watch.current();
    await client.execute('SELECT * FROM item');
    expect(watch.current()).toBe(start);

    await client.execute("INSERT INTO item (name) VALUES ('second')");
    const afterInsert = watch.current();
    expect(afterInsert).not.toBe(start);

    // Uncommitted work is invisible; the commit is not.
    const tx = await client.transaction('write');
    await tx.execute("UPDATE item SET name = 'renamed' WHERE id = 1");
    expect(watch.current()).toBe(afterInsert);
    await tx.commit();
    const afterCommit = watch.current();
    expect(afterCommit).not.toBe(afterInsert);

    // A rolled-back transaction changed nothing.
    const rolledBack = await client.transaction('write');
    await rolledBack.execute('DELETE FROM item');
    await rolledBack.rollback();
    expect(watch.current()).toBe(afterCommit);

    // Another client of the same file, as a script or a second server would be.
    const other = createClient({ url });
    await other.execute("INSERT INTO item (name) VALUES ('from elsewhere')");
    expect(watch.current()).not.toBe(afterCommit);
    other.close();
    client.close();
    watch.close();
  });
});

describe('createReadCache', () => {
  it('serves a computed answer again until something is committed, then computes afresh', async () => {
    const { client, watch } = await freshDatabase('cache');
    const cache = createReadCache<{ names: string[] }>({
      maxEntries: 10,
      ttlMs: 60_000,
      version: () => watch,
    });
    let computed = 0;
    const names = () =>
      cache.get('items', async () => {
        computed += 1;
        const result = await client.execute('SELECT name FROM item ORDER BY id');
        return { names: result.rows.map((r) => String(r.name)) };
      });

    expect(await names()).toEqual({ names: ['first'] });
    expect(await names()).toEqual({ names: ['first'] });
    expect(computed).toBe(1);

    await client.execute("INSERT INTO item (name) VALUES ('second')");
    expect(await names()).toEqual({ names: ['first', 'second'] });
    expect(computed).toBe(2);
    expect(cache.stats()).toEqual({ hits: 1, misses: 2 });
    client.close();
    watch.close();
  });

  it('keeps answers apart by key and by live tag, and expires them after the TTL', async () => {
    const { client, watch } = await freshDatabase('tags');
    const cache = createReadCache<{ n: number }>({
      maxEntries: 10,
      ttlMs: 50,
      version: () => watch,
    });
    let n = 0;
    const next = async () => ({ n: ++n });
    expect(await cache.get('a', next)).toEqual({ n: 1 });
    expect(await cache.get('b', next)).toEqual({ n: 2 });
    expect(await cache.get('a', next)).toEqual({ n: 1 });
    expect(await cache.get('a', next, 'progress 1')).toEqual({ n: 3 });
    expect(await cache.get('a', next, 'progress 1')).toEqual({ n: 3 });
    await new Promise((done) => setTimeout(done, 80));
    expect(await cache.get('a', next, 'progress 1')).toEqual({ n: 4 });
    client.close();
    watch.close();
  });

  it('computes once for concurrent misses and never caches a failure', async () => {
    const { client, watch } = await freshDatabase('flight');
    const cache = createReadCache<{ n: number }>({
      maxEntries: 10,
      ttlMs: 60_000,
      version: () => watch,
    });
    let calls = 0;
    const slow = async () => {
      calls += 1;
      await new Promise((done) => setTimeout(done, 20));
      return { n: calls };
    };
    const answers = await Promise.all([1, 2, 3, 4].map(() => cache.get('k', slow)));
    expect(answers).toEqual([{ n: 1 }, { n: 1 }, { n: 1 }, { n: 1 }]);
    expect(calls).toBe(1);

    let attempts = 0;
    const failing = async (): Promise<{ n: number }> => {
      attempts += 1;
      throw new Error('not found');
    };
    await expect(cache.get('missing', failing)).rejects.toThrow('not found');
    await expect(cache.get('missing', failing)).rejects.toThrow('not found');
    expect(attempts).toBe(2);
    client.close();
    watch.close();
  });

  it('bounds its memory: the least recently used answers go first, an oversized one is not kept', async () => {
    const { client, watch } = await freshDatabase('size');
    const cache = createReadCache<{ body: string }>({
      maxEntries: 100,
      ttlMs: 60_000,
      sizeOf: (v) => v.body.length,
      maxSize: 100,
      version: () => watch,
    });
    let computed = 0;
    const answer = (length: number) => async () => {
      computed += 1;
      return { body: 'x'.repeat(length) };
    };
    await cache.get('a', answer(40));
    await cache.get('b', answer(40));
    await cache.get('a', answer(40)); // a hit, and now the more recently used
    expect(computed).toBe(2);
    await cache.get('c', answer(40)); // 120 > 100: b, the least recently used, goes
    await cache.get('a', answer(40));
    expect(computed).toBe(3);
    await cache.get('b', answer(40));
    expect(computed).toBe(4);
    await cache.get('huge', answer(500));
    await cache.get('huge', answer(500));
    expect(computed).toBe(6);
    client.close();
    watch.close();
  });

  it('caches nothing when the database is not a local file', async () => {
    const cache = createReadCache<{ n: number }>({
      maxEntries: 10,
      ttlMs: 60_000,
      version: () => null,
    });
    let n = 0;
    await cache.get('k', async () => ({ n: ++n }));
    await cache.get('k', async () => ({ n: ++n }));
    expect(n).toBe(2);
  });
});
