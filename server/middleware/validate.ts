import type { ZodError, ZodType } from "zod";
import { badRequest } from "../http-error";

export function zodFields(err: ZodError): { path: string; message: string }[] {
  return err.issues.map((i) => ({ path: i.path.map(String).join("."), message: i.message }));
}

/** Parse `value` with `schema`; a failure is a 400 naming each field. */
export function parseOr400<T>(schema: ZodType<T>, value: unknown, where = "body"): T {
  const r = schema.safeParse(value);
  if (r.success) return r.data;
  const fields = zodFields(r.error);
  throw badRequest(`Invalid ${where}: ${fields.map((f) => `${f.path || where}: ${f.message}`).join("; ")}`, fields, "invalid");
}
