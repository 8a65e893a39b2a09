import { describe, expect, it } from 'vitest';
import { createFixedWindowStore } from '@/lib/auth/rate-limit-store';

describe('createFixedWindowStore', () => {
  it('allows max requests per window, counted from the first, then says when to retry', async () => {
    const clock = { now: 0 };
    const store = createFixedWindowStore(() => clock.now);
    const rule = { window: 60, max: 3 };
    for (let i = 0; i < 3; i++) {
      expect(await store.consume('127.0.0.1|/sign-in/email', rule)).toEqual({
        allowed: true,
        retryAfter: null,
      });
      clock.now += 10_000;
    }
    expect(await store.consume('127.0.0.1|/sign-in/email', rule)).toEqual({
      allowed: false,
      retryAfter: 30,
    });
    expect((await store.consume('10.0.0.9|/sign-in/email', rule)).allowed).toBe(true);
    clock.now = 60_000;
    expect((await store.consume('127.0.0.1|/sign-in/email', rule)).allowed).toBe(true);
  });

  it('lets a steady client through however long it goes on below the rate', async () => {
    // better-auth's own store restarts the window at each request and would refuse this.
    const clock = { now: 0 };
    const store = createFixedWindowStore(() => clock.now);
    for (let i = 0; i < 1000; i++) {
      expect((await store.consume('steady', { window: 60, max: 10 })).allowed, `${i}`).toBe(true);
      clock.now += 6_000;
    }
  });
});
