/**
 * Storage for better-auth's request rate limit with the meaning people expect: at most `max`
 * requests per `window` seconds, counted from the first request of the window. better-auth's
 * own memory store restarts the window at every allowed request, so a client that never
 * pauses for a whole window (the test suite signing in all through its run) is refused in
 * the end however slowly it goes. Kept in this process's memory, like better-auth's.
 */
export interface RateLimitRule {
  /** Seconds. */
  window: number;
  max: number;
}

export interface RateLimitStore {
  consume(
    key: string,
    rule: RateLimitRule,
  ): Promise<{ allowed: boolean; retryAfter: number | null }>;
}

/** Keys remembered at once; the least recently used are forgotten first (memory bound). */
const maxTrackedKeys = 10_000;

export function createFixedWindowStore(now: () => number = Date.now): RateLimitStore {
  const windows = new Map<string, { startedAt: number; count: number }>();
  return {
    async consume(key, rule) {
      const at = now();
      const windowMs = rule.window * 1000;
      const current = windows.get(key);
      const entry =
        current && at - current.startedAt < windowMs ? current : { startedAt: at, count: 0 };
      if (entry.count >= rule.max) {
        const retryAfter = Math.max(1, Math.ceil((entry.startedAt + windowMs - at) / 1000));
        return { allowed: false, retryAfter };
      }
      entry.count += 1;
      windows.delete(key);
      windows.set(key, entry);
      while (windows.size > maxTrackedKeys) {
        const oldest = windows.keys().next().value;
        if (oldest === undefined) break;
        windows.delete(oldest);
      }
      return { allowed: true, retryAfter: null };
    },
  };
}
