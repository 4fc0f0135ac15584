// A fixed-window counter per key, in memory (one server process). Sign-in uses two: one keyed by
// the client's address (every attempt counts) and one keyed by the account (failures count).
export interface RateLimitRule {
  /** Attempts allowed per window. */
  limit: number;
  windowMs: number;
}

export class FixedWindowLimiter {
  private readonly windows = new Map<string, { count: number; resetAt: number }>();

  constructor(readonly rule: RateLimitRule) {}

  /** Milliseconds until the key may try again, or 0 when it is under the limit. */
  blockedFor(key: string, now = Date.now()): number {
    const window = this.windows.get(key);
    if (!window || window.resetAt <= now) return 0;
    return window.count >= this.rule.limit ? window.resetAt - now : 0;
  }

  hit(key: string, now = Date.now()): void {
    const window = this.windows.get(key);
    if (!window || window.resetAt <= now) {
      this.windows.set(key, { count: 1, resetAt: now + this.rule.windowMs });
      if (this.windows.size > 10_000) this.prune(now);
    } else {
      window.count += 1;
    }
  }

  reset(key: string): void {
    this.windows.delete(key);
  }

  private prune(now: number): void {
    for (const [key, window] of this.windows) if (window.resetAt <= now) this.windows.delete(key);
  }
}
