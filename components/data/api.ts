/**
 * The one fetch wrapper: same-origin cookies, JSON in and out, the shared
 * error shape parsed into a thrown ApiError. Screens never call fetch; they
 * use the hooks in this folder.
 */
import type { z } from "zod";
import { ApiErrorSchema } from "@/shared/schemas/errors";

export type FieldError = { path: string; message: string };

export class ApiError extends Error {
  readonly status: number;
  readonly code: string;
  readonly fields: FieldError[];
  /** The whole parsed error answer, for routes whose errors carry more than fields (e.g. an SBML refusal report). */
  readonly body: unknown;
  constructor(status: number, code: string, message: string, fields: FieldError[] = [], body: unknown = undefined) {
    super(message);
    this.name = "ApiError";
    this.status = status;
    this.code = code;
    this.fields = fields;
    this.body = body;
  }
  /** Field errors keyed by path ("species.0.name"), first message wins. */
  fieldMap(): Record<string, string> {
    const out: Record<string, string> = {};
    for (const f of this.fields) if (!(f.path in out)) out[f.path] = f.message;
    return out;
  }
}

export function isUnauthorized(error: unknown): boolean {
  return error instanceof ApiError && error.status === 401;
}

/** Base URL: same origin in the browser; tests may set globalThis.__LINGER_API_BASE__. */
function baseUrl(): string {
  const g = globalThis as { __LINGER_API_BASE__?: string };
  return g.__LINGER_API_BASE__ ?? "";
}

export type RequestOptions<T> = {
  method?: "GET" | "POST" | "PUT" | "PATCH" | "DELETE";
  body?: unknown;
  /** Response schema; the body is parsed with it (a mismatch is a thrown error, not silent). */
  schema?: z.ZodType<T>;
  signal?: AbortSignal;
};

export async function api<T = unknown>(path: string, opts: RequestOptions<T> = {}): Promise<T> {
  const { method = "GET", body, schema, signal } = opts;
  let res: Response;
  try {
    res = await fetch(baseUrl() + path, {
      method,
      credentials: "same-origin",
      headers: { Accept: "application/json", ...(body !== undefined ? { "Content-Type": "application/json" } : {}) },
      body: body !== undefined ? JSON.stringify(body) : undefined,
      signal,
    });
  } catch (e) {
    if ((e as Error)?.name === "AbortError") throw e;
    throw new ApiError(0, "network", "Could not reach the Linger server. Check your connection and try again.");
  }
  const text = await res.text();
  let json: unknown = undefined;
  if (text) {
    try {
      json = JSON.parse(text);
    } catch {
      json = undefined;
    }
  }
  if (!res.ok) {
    const parsed = ApiErrorSchema.safeParse(json);
    if (parsed.success) {
      const e = parsed.data.error;
      throw new ApiError(res.status, e.code, e.message, e.fields ?? [], json);
    }
    throw new ApiError(res.status, `http_${res.status}`, res.status === 401 ? "Please sign in." : `The server answered ${res.status}.`);
  }
  if (!schema) return json as T;
  const parsed = schema.safeParse(json);
  if (!parsed.success) {
    throw new ApiError(res.status, "bad_response", `Unexpected response from ${path}: ${parsed.error.issues[0]?.message ?? "invalid"}`);
  }
  return parsed.data;
}

/** Absolute URL for links that the browser opens itself (exports). */
export function apiUrl(path: string): string {
  return baseUrl() + path;
}
