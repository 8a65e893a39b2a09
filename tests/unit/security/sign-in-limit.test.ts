import { describe, expect, it } from 'vitest';
import { SignInFailureLimiter, signInLimit } from '@/lib/auth/sign-in-limit';

function limiterAt(start = 1_000_000) {
  const clock = { now: start };
  const limiter = new SignInFailureLimiter(signInLimit, () => clock.now);
  return { limiter, clock };
}

const windowMs = signInLimit.windowSeconds * 1000;

describe('SignInFailureLimiter', () => {
  it('allows five failures, then refuses until the first is fifteen minutes old', () => {
    const { limiter, clock } = limiterAt();
    for (let i = 0; i < signInLimit.maxFailures; i++) {
      expect(limiter.begin('victim@example.test')).toBe(0);
      clock.now += 1000;
    }
    // First failure at t0; now t0 + 5 s: 895 s to go.
    expect(limiter.begin('victim@example.test')).toBe(signInLimit.windowSeconds - 5);
    expect(limiter.begin('VICTIM@example.test ')).toBe(signInLimit.windowSeconds - 5);
    clock.now = 1_000_000 + windowMs - 1;
    expect(limiter.begin('victim@example.test')).toBe(1);
    clock.now = 1_000_000 + windowMs;
    expect(limiter.begin('victim@example.test')).toBe(0);
  });

  it('counts each address on its own', () => {
    const { limiter } = limiterAt();
    for (let i = 0; i < signInLimit.maxFailures; i++) limiter.begin('a@example.test');
    expect(limiter.begin('a@example.test')).toBeGreaterThan(0);
    expect(limiter.begin('b@example.test')).toBe(0);
  });

  it('takes back successful attempts but not earlier failures', () => {
    const { limiter } = limiterAt();
    for (let i = 0; i < 10; i++) {
      expect(limiter.begin('owner@example.test')).toBe(0);
      limiter.succeeded('owner@example.test');
    }
    for (let i = 0; i < signInLimit.maxFailures - 1; i++) limiter.begin('owner@example.test');
    expect(limiter.begin('owner@example.test')).toBe(0);
    limiter.succeeded('owner@example.test');
    expect(limiter.begin('owner@example.test')).toBe(0);
    expect(limiter.begin('owner@example.test')).toBeGreaterThan(0);
  });

  it('counts attempts still in progress, so parallel guesses stop at the limit', () => {
    const { limiter } = limiterAt();
    const answers = Array.from({ length: 20 }, () => limiter.begin('burst@example.test'));
    expect(answers.filter((a) => a === 0)).toHaveLength(signInLimit.maxFailures);
  });
});
