/** Reads the local mail fake's stored messages. */
import { inject } from 'vitest';

export interface StoredMail {
  to: string[];
  subject: string;
  text: string;
}

/**
 * Mail to `address` whose subject matches, waiting up to about five seconds: the app sends
 * through a queue, so a message may arrive just after the request that caused it.
 */
export async function waitForMail(address: string, subject: RegExp = /./): Promise<StoredMail[]> {
  for (let i = 0; i < 50; i++) {
    const found = (await allMail()).filter(
      (m) => m.to.includes(address) && subject.test(m.subject),
    );
    if (found.length > 0) return found;
    await new Promise((r) => setTimeout(r, 100));
  }
  return [];
}

/** Every message the fake holds, newest first. */
export async function allMail(): Promise<StoredMail[]> {
  const answer = await fetch(new URL('/messages', inject('mailUrl')));
  return ((await answer.json()) as { messages: StoredMail[] }).messages;
}
