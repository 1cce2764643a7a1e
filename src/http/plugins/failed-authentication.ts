/**
 * Failed authentication, limited per client address: after `limit` failures
 * in a minute the address gets 429 with Retry-After, before its key is even
 * looked at, until the minute is over. Guessing keys is hopeless anyway
 * (190 bits of secret), but an unlimited stream of failures costs a hash and
 * a database read each. Kept in memory per instance, bounded in size.
 */

/** At most this many addresses are tracked; the oldest windows go first. */
const MAX_TRACKED = 10_000;

interface Window {
  startedAt: number;
  failures: number;
}

export class FailedAuthenticationLimit {
  private readonly windows = new Map<string, Window>();

  constructor(
    readonly limit: number,
    readonly windowMs = 60_000,
    private readonly clock: () => number = Date.now,
  ) {}

  /** Seconds until `address` may try again, or 0 when it may try now. */
  retryAfterSeconds(address: string): number {
    const window = this.windows.get(address);
    if (!window) return 0;
    const elapsed = this.clock() - window.startedAt;
    if (elapsed >= this.windowMs) {
      this.windows.delete(address);
      return 0;
    }
    return window.failures >= this.limit ? Math.max(1, Math.ceil((this.windowMs - elapsed) / 1000)) : 0;
  }

  recordFailure(address: string): void {
    const now = this.clock();
    const window = this.windows.get(address);
    if (window && now - window.startedAt < this.windowMs) {
      window.failures++;
      return;
    }
    this.windows.delete(address);
    if (this.windows.size >= MAX_TRACKED) this.forgetOldest(now);
    this.windows.set(address, { startedAt: now, failures: 1 });
  }

  private forgetOldest(now: number): void {
    for (const [address, window] of this.windows) {
      if (this.windows.size < MAX_TRACKED) break;
      // Insertion order is start order: expired ones come first, then the oldest live ones.
      if (now - window.startedAt >= this.windowMs || this.windows.size >= MAX_TRACKED) this.windows.delete(address);
    }
  }
}
