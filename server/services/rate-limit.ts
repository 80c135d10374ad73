/**
 * A small in-memory rate limiter (fixed window per key), for sign-in and
 * password reset. One set of limiters per app context, so tests are
 * independent; tests may replace or reset them.
 */
import type { AppContext } from "@/server/context";
import { tooMany } from "@/server/http-error";

export class RateLimiter {
  private readonly hits = new Map<string, { count: number; windowStart: number }>();

  constructor(
    readonly limit: number,
    readonly windowMs: number,
    private readonly now: () => number = Date.now,
  ) {}

  private entry(key: string) {
    const t = this.now();
    let e = this.hits.get(key);
    if (!e || t - e.windowStart >= this.windowMs) {
      e = { count: 0, windowStart: t };
      this.hits.set(key, e);
    }
    return e;
  }

  /** Seconds until the key may try again, or 0 when it is not blocked. */
  retryAfterSeconds(key: string): number {
    const e = this.entry(key);
    if (e.count < this.limit) return 0;
    return Math.max(1, Math.ceil((e.windowStart + this.windowMs - this.now()) / 1000));
  }

  hit(key: string): void {
    this.entry(key).count++;
    if (this.hits.size > 10_000) this.sweep();
  }

  clear(key: string): void {
    this.hits.delete(key);
  }

  reset(): void {
    this.hits.clear();
  }

  private sweep() {
    const t = this.now();
    for (const [k, e] of this.hits) if (t - e.windowStart >= this.windowMs) this.hits.delete(k);
  }
}

export interface AuthLimiters {
  /** Failed sign-ins per e-mail address. */
  signInPerEmail: RateLimiter;
  /** Failed sign-ins per client address. */
  signInPerIp: RateLimiter;
  /** Reset requests and failed reset confirmations per e-mail address. */
  resetPerEmail: RateLimiter;
  /** Reset requests and failed reset confirmations per client address. */
  resetPerIp: RateLimiter;
}

const FIFTEEN_MINUTES = 15 * 60 * 1000;

export function defaultAuthLimiters(now: () => number = Date.now): AuthLimiters {
  return {
    signInPerEmail: new RateLimiter(10, FIFTEEN_MINUTES, now),
    signInPerIp: new RateLimiter(30, FIFTEEN_MINUTES, now),
    resetPerEmail: new RateLimiter(5, FIFTEEN_MINUTES, now),
    resetPerIp: new RateLimiter(20, FIFTEEN_MINUTES, now),
  };
}

const byContext = new WeakMap<object, AuthLimiters>();

export function authLimitersOf(ctx: AppContext): AuthLimiters {
  let l = byContext.get(ctx);
  if (!l) {
    l = defaultAuthLimiters();
    byContext.set(ctx, l);
  }
  return l;
}

/** Replace the limiters of a context (tests: a fake clock or tighter limits). */
export function setAuthLimiters(ctx: AppContext, limiters: AuthLimiters): void {
  byContext.set(ctx, limiters);
}

export function resetAuthLimiters(ctx: AppContext): void {
  for (const l of Object.values(authLimitersOf(ctx))) l.reset();
}

/** Throws 429 when any of the (limiter, key) pairs is over its limit. */
export function assertNotLimited(pairs: [RateLimiter, string][], what: string): void {
  let wait = 0;
  for (const [l, k] of pairs) wait = Math.max(wait, l.retryAfterSeconds(k));
  if (wait > 0) {
    const minutes = Math.ceil(wait / 60);
    throw tooMany(`Too many ${what} attempts. Try again in ${minutes} minute${minutes === 1 ? "" : "s"}.`);
  }
}
