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

/**
 * A backstop that slows a key down instead of locking it: the first
 * `freeFailures` failures in a window cost nothing; after that each attempt
 * must wait a spacing after the previous failure that doubles per failure from
 * `baseSpacingMs` up to `maxSpacingMs`. A real owner is delayed by at most
 * `maxSpacingMs`, while a guesser spread over many clients gets only about one
 * try per `maxSpacingMs` (OWASP Authentication Cheat Sheet: prefer throttling
 * to account lockout, which lets anyone lock an account).
 */
export class SlowDown {
  private readonly fails = new Map<string, { count: number; windowStart: number; last: number }>();

  constructor(
    readonly freeFailures: number,
    readonly windowMs: number,
    readonly baseSpacingMs: number,
    readonly maxSpacingMs: number,
    private readonly now: () => number = Date.now,
  ) {}

  private entry(key: string) {
    const t = this.now();
    const e = this.fails.get(key);
    if (e && t - e.windowStart >= this.windowMs) {
      this.fails.delete(key);
      return undefined;
    }
    return e;
  }

  /** The spacing now required between attempts for this key (0 while under the free failures). */
  spacingMs(key: string): number {
    const e = this.entry(key);
    if (!e || e.count < this.freeFailures) return 0;
    return Math.min(this.maxSpacingMs, this.baseSpacingMs * 2 ** (e.count - this.freeFailures));
  }

  /** Seconds until the key may try again, or 0. */
  retryAfterSeconds(key: string): number {
    const e = this.entry(key);
    const spacing = this.spacingMs(key);
    if (!e || spacing === 0) return 0;
    const wait = e.last + spacing - this.now();
    return wait > 0 ? Math.max(1, Math.ceil(wait / 1000)) : 0;
  }

  hit(key: string): void {
    const t = this.now();
    const e = this.entry(key) ?? { count: 0, windowStart: t, last: t };
    e.count++;
    e.last = t;
    this.fails.set(key, e);
    if (this.fails.size > 10_000)
      for (const [k, v] of this.fails) if (t - v.windowStart >= this.windowMs) this.fails.delete(k);
  }

  clear(key: string): void {
    this.fails.delete(key);
  }

  reset(): void {
    this.fails.clear();
  }
}

export interface AuthLimiters {
  /** Failed sign-ins per (e-mail address, client address) pair: locks only that client out of that account. */
  signInPerPair: RateLimiter;
  /** Failed sign-ins per client address (over all addresses). */
  signInPerIp: RateLimiter;
  /** Failed sign-ins per e-mail address from all clients: slows down, never locks. */
  signInPerEmail: SlowDown;
  /** Reset requests and failed reset confirmations per e-mail address. */
  resetPerEmail: RateLimiter;
  /** Reset requests and failed reset confirmations per client address. */
  resetPerIp: RateLimiter;
  /** Password changes with a wrong current password, per user. */
  changePasswordPerUser: RateLimiter;
  /** Sign-up requests per client address. */
  signUpPerIp: RateLimiter;
}

const FIFTEEN_MINUTES = 15 * 60 * 1000;

export function defaultAuthLimiters(now: () => number = Date.now): AuthLimiters {
  return {
    signInPerPair: new RateLimiter(10, FIFTEEN_MINUTES, now),
    signInPerIp: new RateLimiter(30, FIFTEEN_MINUTES, now),
    signInPerEmail: new SlowDown(20, FIFTEEN_MINUTES, 1000, 30_000, now),
    resetPerEmail: new RateLimiter(5, FIFTEEN_MINUTES, now),
    resetPerIp: new RateLimiter(20, FIFTEEN_MINUTES, now),
    changePasswordPerUser: new RateLimiter(5, FIFTEEN_MINUTES, now),
    signUpPerIp: new RateLimiter(20, FIFTEEN_MINUTES, now),
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

/** Anything that can say how long a key must wait. */
export interface Limit {
  retryAfterSeconds(key: string): number;
}

/** Throws 429 with Retry-After when any of the (limiter, key) pairs is over its limit. */
export function assertNotLimited(pairs: [Limit, string][], what: string): void {
  let wait = 0;
  for (const [l, k] of pairs) wait = Math.max(wait, l.retryAfterSeconds(k));
  if (wait > 0) {
    const when =
      wait < 60
        ? `${wait} second${wait === 1 ? "" : "s"}`
        : `${Math.ceil(wait / 60)} minute${Math.ceil(wait / 60) === 1 ? "" : "s"}`;
    throw tooMany(`Too many ${what} attempts. Try again in ${when}.`, wait);
  }
}
