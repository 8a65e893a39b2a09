import { getDb } from '../db/client';
import { flushOutbox, startOutboxWorker } from '../mail/outbox';
import { recoverInterruptedPackages } from './packaging';

let started = false;

/**
 * Work the server does besides answering requests: retrying queued e-mail, and (once, at
 * start) failing package builds that a stopped server left unfinished. Idempotent; the
 * middleware calls it on every request.
 */
export function ensureBackgroundWork(): void {
  if (started) return;
  started = true;
  const db = getDb();
  startOutboxWorker(db);
  void recoverInterruptedPackages(db)
    .then(
      (n) => n > 0 && console.log(`[packaging] ${n} interrupted package build(s) marked failed`),
    )
    .catch((error) => console.error('[packaging] recovery failed', error));
  void flushOutbox(db).catch(() => undefined);
}
