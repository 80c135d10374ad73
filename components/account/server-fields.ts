import { ApiError } from "@/components/data/api";
import { stripPrefix } from "@/components/forms/zod-errors";

/** Field errors of a server answer keyed by the request field ("email"), whether the path starts with "body." or not. */
export function serverFields(error: unknown): Record<string, string> {
  return error instanceof ApiError ? stripPrefix(error.fieldMap(), "body.") : {};
}

/** The server's message for a form-level banner: none when every problem is shown under a field. */
export function serverMessage(error: unknown, shownFields: string[], fallback: string): string | undefined {
  if (!error) return undefined;
  if (!(error instanceof ApiError)) return fallback;
  const fields = serverFields(error);
  const keys = Object.keys(fields);
  if (keys.length && keys.every((k) => shownFields.includes(k))) return undefined;
  return error.message;
}
