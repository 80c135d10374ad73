/**
 * Which new passwords are refused: the length rules in shared/schemas/auth.ts
 * (checked by the zod schemas) and, here on the server, any password found in
 * a list of commonly used passwords. NIST SP 800-63B (Digital Identity
 * Guidelines, Authentication), section 5.1.1.2, says verifiers SHALL compare a
 * new memorized secret against a list of values known to be commonly used and
 * refuse it when found. The list is the one shipped by
 * @zxcvbn-ts/language-common ("passwords-common", about 49,000 passwords
 * ranked by frequency in leaked password sets), compared case-insensitively.
 */
import { dictionary } from "@zxcvbn-ts/language-common";
import { badRequest } from "@/server/http-error";

let common: Set<string> | null = null;

function commonPasswords(): Set<string> {
  common ??= new Set(dictionary["passwords-common"].map((p) => p.toLowerCase()));
  return common;
}

/** True when the password is on the common-password list (case and surrounding spaces ignored). */
export function isCommonPassword(password: string): boolean {
  return commonPasswords().has(password.trim().toLowerCase());
}

/** Throws a 400 naming `field` when the password is too common to be allowed. */
export function assertPasswordAllowed(password: string, field: string): void {
  if (!isCommonPassword(password)) return;
  const message = "is one of the most commonly used passwords, so it is easy to guess. Choose another.";
  throw badRequest(`Invalid body: ${field}: ${message}`, [{ path: field, message }], "common_password");
}
