/**
 * Limits password guessing against one account: after `maxFailures` failed sign-ins for an
 * e-mail address within `windowSeconds`, every sign-in for that address is refused until the
 * oldest of them is older than the window (OWASP Authentication Cheat Sheet, "Account
 * Lockout"; 5 in 15 minutes is common practice, well inside NIST SP 800-63B §5.2.2's 100).
 *
 * Attempts are counted when they start, so parallel guesses cannot slip past the limit, and
 * a successful one is taken back again; a success does not forgive earlier failures. Unknown
 * addresses are counted the same way, so the limit does not reveal which accounts exist.
 * Counts live in this process's memory: a restart forgets them (one server per database).
 */
export const signInLimit = { maxFailures: 5, windowSeconds: 15 * 60 } as const;

/** Addresses remembered at once; the oldest are forgotten first beyond this (memory bound). */
const maxTrackedAddresses = 10_000;

export class SignInFailureLimiter {
  private attempts = new Map<string, number[]>();

  constructor(
    private readonly limit: { maxFailures: number; windowSeconds: number } = signInLimit,
    private readonly now: () => number = Date.now,
  ) {}

  /**
   * Starts an attempt for `email`: 0 when it may go on (and it is counted), otherwise the
   * seconds until the address may try again.
   */
  begin(email: string): number {
    const key = normaliseEmail(email);
    const now = this.now();
    const recent = this.recent(key, now);
    if (recent.length >= this.limit.maxFailures) {
      const oldest = recent[recent.length - this.limit.maxFailures] ?? now;
      return Math.max(1, Math.ceil((oldest + this.limit.windowSeconds * 1000 - now) / 1000));
    }
    recent.push(now);
    this.attempts.delete(key);
    this.attempts.set(key, recent);
    this.forgetOldest();
    return 0;
  }

  /** Takes back the attempt `begin` counted, because the password was right. */
  succeeded(email: string): void {
    const key = normaliseEmail(email);
    const recent = this.recent(key, this.now());
    recent.pop();
    if (recent.length === 0) this.attempts.delete(key);
    else this.attempts.set(key, recent);
  }

  private recent(key: string, now: number): number[] {
    const since = now - this.limit.windowSeconds * 1000;
    return (this.attempts.get(key) ?? []).filter((t) => t > since);
  }

  private forgetOldest(): void {
    while (this.attempts.size > maxTrackedAddresses) {
      const oldest = this.attempts.keys().next().value;
      if (oldest === undefined) return;
      this.attempts.delete(oldest);
    }
  }
}

function normaliseEmail(email: string): string {
  return email.trim().toLowerCase();
}
