import { randomUUID } from 'node:crypto';
import { and, asc, eq, lt } from 'drizzle-orm';
import type { Database } from '../db/client';
import { outbox } from '../db/schema';
import { sendMail } from './mailer';
import type { MailMessage } from './templates';

/** Attempts before a message is given up on (it stays in the outbox as 'failed'). */
const maxAttempts = 8;

/** Stores messages to send; the caller's change and its e-mail are recorded together. */
export async function enqueueMail(
  db: Pick<Database, 'insert'>,
  organizationId: string | null,
  messages: MailMessage[],
): Promise<void> {
  for (const m of messages) {
    await db.insert(outbox).values({
      id: randomUUID(),
      organizationId,
      toAddress: m.to,
      subject: m.subject,
      textBody: m.text,
      htmlBody: m.html,
    });
  }
}

let flushing: Promise<number> | null = null;
let requestedAgain = false;

async function sendPendingOnce(db: Database): Promise<number> {
  let sent = 0;
  const pending = await db
    .select()
    .from(outbox)
    .where(and(eq(outbox.state, 'pending'), lt(outbox.attempts, maxAttempts)))
    .orderBy(asc(outbox.createdAt))
    .limit(50);
  for (const row of pending) {
    try {
      await sendMail({
        to: row.toAddress,
        subject: row.subject,
        text: row.textBody,
        html: row.htmlBody,
      });
      await db
        .update(outbox)
        .set({ state: 'sent', sentAt: new Date(), attempts: row.attempts + 1 })
        .where(eq(outbox.id, row.id));
      sent++;
    } catch (error) {
      const attempts = row.attempts + 1;
      await db
        .update(outbox)
        .set({
          attempts,
          lastError: error instanceof Error ? error.message : String(error),
          state: attempts >= maxAttempts ? 'failed' : 'pending',
        })
        .where(eq(outbox.id, row.id));
    }
  }
  return sent;
}

/**
 * Sends every pending message; returns how many went out. Safe to call often: a call while
 * a flush runs makes that flush look again when it ends, so nothing queued meanwhile waits
 * for the timer.
 */
export function flushOutbox(db: Database): Promise<number> {
  if (flushing) {
    requestedAgain = true;
    return flushing;
  }
  flushing = (async () => {
    let sent = 0;
    try {
      do {
        requestedAgain = false;
        sent += await sendPendingOnce(db);
      } while (requestedAgain);
    } finally {
      flushing = null;
    }
    return sent;
  })();
  return flushing;
}

let timer: NodeJS.Timeout | null = null;

/** Retries pending mail every `intervalMs` for the life of the process. */
export function startOutboxWorker(db: Database, intervalMs = 15_000): void {
  if (timer) return;
  timer = setInterval(() => void flushOutbox(db).catch(() => undefined), intervalMs);
  timer.unref();
}
