/**
 * Answers that stay the same until something is written: the serialised JSON (and its gzip and deflate
 * forms, made once) of a finished run's detail, with an ETag, so a repeated request costs a lookup instead
 * of reading and parsing the row, the reproduction check, the acceleration and a compression.
 *
 * Validity: an entry is served only while the database is as it was when the answer was built: the stamp
 * is SQLite's `total_changes()` on the server's connection (every row any statement of this process inserts,
 * updates or deletes, whoever wrote it: routes, the queue, the purge, the session store) with `data_version`
 * (which moves when another connection, e.g. another process, commits). So no writer has to remember to
 * invalidate, at the price that a computing run's chunk writes also retire the entries. Only answers built
 * from the database alone are cached (a finished run's detail; a computing run's progress lives in the
 * queue's memory). Access checks run before any lookup, and an entry holds no per-caller part (the detail
 * names the run's creator and its history, the same for every member of its lab).
 *
 * Memory: at most `maxBytes` (JSON plus compressed forms), least recently used first out.
 */
import { createHash } from "node:crypto";
import { deflateSync, gzipSync } from "node:zlib";
import type { AppContext } from "@/server/context";

export type AnswerEncoding = "gzip" | "deflate" | "identity";

export interface CachedAnswer {
  /** A strong validator: the JSON's SHA-1, quoted. */
  readonly etag: string;
  readonly json: Buffer;
  readonly key: string;
  /** The stamp it was built under; see AnswerCache.stamp. */
  readonly stamp: string;
  /** Compressed forms, made on first use. */
  encoded: Partial<Record<"gzip" | "deflate", Buffer>>;
}

/** The default bound on one cache's memory: a 59 KB detail (about 8 KB compressed) fits some 400 times. */
export const ANSWER_CACHE_MAX_BYTES = 32 * 1024 * 1024;

export class AnswerCache {
  private bytes = 0;
  /** The stamp the entries were built under: when it moves they are all stale. */
  private seen = "";
  /** Insertion order is recency order: a hit moves its entry to the end. */
  private readonly entries = new Map<string, CachedAnswer>();

  constructor(
    private readonly writeStamp: () => string,
    readonly maxBytes = ANSWER_CACHE_MAX_BYTES,
  ) {}

  /** The write stamp now: capture it before reading what the answer is built from. */
  stamp(): string {
    return this.writeStamp();
  }

  /** The entry for `key` if it is still valid. */
  get(key: string): CachedAnswer | undefined {
    if (this.stamp() !== this.seen) {
      this.clear();
      return undefined;
    }
    const e = this.entries.get(key);
    if (!e) return undefined;
    this.entries.delete(key);
    this.entries.set(key, e);
    return e;
  }

  /**
   * The answer serialised once (the bytes `res.json` writes) with its ETag; kept under `key` only if nothing
   * was written since `stamp` was taken and it fits the bound.
   */
  put(key: string, stamp: string, value: unknown): CachedAnswer {
    const json = Buffer.from(JSON.stringify(value), "utf8");
    const entry: CachedAnswer = {
      etag: `"${createHash("sha1").update(json).digest("base64url")}"`,
      json,
      key,
      stamp,
      encoded: {},
    };
    if (stamp === this.stamp() && json.length <= this.maxBytes / 4) {
      if (stamp !== this.seen) {
        this.clear();
        this.seen = stamp;
      }
      const old = this.entries.get(key);
      if (old) this.drop(key, old);
      this.entries.set(key, entry);
      this.bytes += json.length;
      this.evict();
    }
    return entry;
  }

  /** The body in `encoding`, compressing it at most once per entry. */
  body(entry: CachedAnswer, encoding: AnswerEncoding): Buffer {
    if (encoding === "identity") return entry.json;
    let b = entry.encoded[encoding];
    if (!b) {
      b = encoding === "gzip" ? gzipSync(entry.json) : deflateSync(entry.json);
      entry.encoded[encoding] = b;
      if (this.entries.get(entry.key) === entry) {
        this.bytes += b.length;
        this.evict();
      }
    }
    return b;
  }

  /** Bytes held (JSON and compressed forms of the entries kept). */
  heldBytes(): number {
    return this.bytes;
  }

  size(): number {
    return this.entries.size;
  }

  private clear() {
    this.entries.clear();
    this.bytes = 0;
  }

  private drop(key: string, e: CachedAnswer) {
    this.entries.delete(key);
    this.bytes -= e.json.length + (e.encoded.gzip?.length ?? 0) + (e.encoded.deflate?.length ?? 0);
  }

  private evict() {
    for (const [key, e] of this.entries) {
      if (this.bytes <= this.maxBytes) return;
      this.drop(key, e);
    }
  }
}

const byDb = new WeakMap<object, AnswerCache>();

/** This context's cache (one per database). */
export function answerCache(ctx: AppContext): AnswerCache {
  let c = byDb.get(ctx.db);
  if (!c) {
    const st = ctx.sqlite
      .prepare("SELECT total_changes() || ':' || (SELECT data_version FROM pragma_data_version()) AS stamp")
      .pluck();
    byDb.set(ctx.db, (c = new AnswerCache(() => st.get() as string)));
  }
  return c;
}
