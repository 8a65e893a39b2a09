import { getDb } from '../db/client';
import { flushOutbox, startOutboxWorker } from '../mail/outbox';
import { getEnv } from './env';
import { recoverInterruptedPackages } from './packaging';
import { resumeInterruptedWork } from './uploads/analysis-queue';

let started = false;

/**
 * Work the server does besides answering requests: retrying queued e-mail, and (once, at
 * start) failing package builds and uploads that a stopped server left unfinished and
 * resuming its unfinished analyses. Idempotent; the
 * middleware calls it on every request.
 */
export function ensureBackgroundWork(): void {
  if (started) return;
  started = true;
  const db = getDb();
  startOutboxWorker(db, getEnv().QUAYSIDE_MAIL_RETRY_MS);
  void recoverInterruptedPackages(db)
    .then(
      (n) => n > 0 && console.log(`[packaging] ${n} interrupted package build(s) marked failed`),
    )
    .catch((error) => console.error('[packaging] recovery failed', error));
  void resumeInterruptedWork(db);
  void flushOutbox(db).catch(() => undefined);
}
