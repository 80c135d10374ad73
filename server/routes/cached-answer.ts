/**
 * Sending an answer from the answer cache (server/services/answer-cache.ts): its ETag, 304 when the
 * caller's `If-None-Match` names it, otherwise the stored bytes in the encoding the caller accepts
 * (compressed once, not per request; the compression middleware leaves an encoded body alone).
 * `Cache-Control: private, no-cache` instead of the API's `no-store`, so a browser keeps the answer
 * and asks again with its ETag every time.
 */
import type { Request, Response } from "express";
import type { AnswerCache, AnswerEncoding, CachedAnswer } from "@/server/services/answer-cache";

/** Below this the compression middleware sends answers as they are (its default threshold). */
const COMPRESS_FROM_BYTES = 1024;

/** Whether an `If-None-Match` header names this ETag (weak comparison, RFC 9110 section 13.1.2). */
export function etagMatches(header: string | undefined, etag: string): boolean {
  if (!header) return false;
  if (header.trim() === "*") return true;
  return header.split(",").some((t) => t.trim().replace(/^W\//, "") === etag);
}

function encodingFor(req: Request, bytes: number): AnswerEncoding {
  if (!req.headers["accept-encoding"] || bytes < COMPRESS_FROM_BYTES) return "identity";
  const e = req.acceptsEncodings("gzip", "deflate", "identity");
  return e === "gzip" || e === "deflate" ? e : "identity";
}

/** Writes `entry` as the response (200 with the body, or 304). */
export function sendCachedAnswer(req: Request, res: Response, cache: AnswerCache, entry: CachedAnswer): undefined {
  res.setHeader("ETag", entry.etag);
  res.setHeader("Cache-Control", "private, no-cache");
  res.setHeader("Vary", "Accept-Encoding");
  if (etagMatches(req.headers["if-none-match"], entry.etag)) {
    res.status(304).end();
    return undefined;
  }
  const encoding = encodingFor(req, entry.json.length);
  const body = cache.body(entry, encoding);
  res.setHeader("Content-Type", "application/json; charset=utf-8");
  if (encoding !== "identity") res.setHeader("Content-Encoding", encoding);
  res.setHeader("Content-Length", body.length);
  res.end(body);
  return undefined;
}
