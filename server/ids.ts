import { randomBytes } from "node:crypto";

/** A random, URL-safe, unguessable id (about 95 bits). */
export function newId(prefix = ""): string {
  return prefix + randomBytes(12).toString("base64url");
}
