import type { ZodError, ZodType } from "zod";
/** An error with an HTTP status and a stable code; the error handler turns it into JSON. */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fields?: { path: string; message: string }[],
    /** Extra response headers (e.g. Retry-After on a 429). */
    readonly headers?: Record<string, string>,
  ) {
    super(message);
  }
}

export const badRequest = (message: string, fields?: { path: string; message: string }[], code = "bad_request") =>
  new HttpError(400, code, message, fields);
export const unauthorized = (message = "Sign in first.") => new HttpError(401, "unauthorized", message);
export const forbidden = (message = "Your role does not allow this.") => new HttpError(403, "forbidden", message);
export const notFound = (what = "That item") => new HttpError(404, "not_found", `${what} was not found.`);
export const conflict = (message: string, code = "conflict") => new HttpError(409, code, message);
/** 429 with Retry-After (seconds) so a client knows when to try again. */
export const tooMany = (message: string, retryAfterSeconds?: number) =>
  new HttpError(
    429,
    "too_many_requests",
    message,
    undefined,
    retryAfterSeconds ? { "Retry-After": String(Math.ceil(retryAfterSeconds)) } : undefined,
  );

export function zodFields(err: ZodError): { path: string; message: string }[] {
  return err.issues.map((i) => ({ path: i.path.map(String).join("."), message: i.message }));
}

/** Parse `value` with `schema`; a failure is a 400 naming each field. */
export function parseOr400<T>(schema: ZodType<T>, value: unknown, where = "body"): T {
  const r = schema.safeParse(value);
  if (r.success) return r.data;
  const fields = zodFields(r.error);
  throw badRequest(
    `Invalid ${where}: ${fields.map((f) => `${f.path || where}: ${f.message}`).join("; ")}`,
    fields,
    "invalid",
  );
}
