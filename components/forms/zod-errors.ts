import type { z } from "zod";

/** zod issues to a map "a.b.0.c" -> first message. */
export function issuesToMap(issues: z.core.$ZodIssue[], prefix = ""): Record<string, string> {
  const out: Record<string, string> = {};
  for (const i of issues) {
    const key = prefix + i.path.map(String).join(".");
    if (key in out) continue;
    // A number field holding text (NaN) gets a plain message rather than zod's type wording.
    out[key] =
      i.code === "invalid_type" && (i as { expected?: string }).expected === "number" ? "Enter a number." : i.message;
  }
  return out;
}

/** Server field errors ("body.species.0.name") with a prefix removed. */
export function stripPrefix(map: Record<string, string>, prefix: string): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [k, v] of Object.entries(map)) out[k.startsWith(prefix) ? k.slice(prefix.length) : k] = v;
  return out;
}

/** Number from a text field: NaN when not a number (so the schema reports it). */
export function parseNumber(text: string): number {
  const s = text.trim().replace(",", ".");
  if (s === "") return Number.NaN;
  const n = Number(s);
  return n;
}
