/**
 * Contract check for API answers: the body must parse with the shared schema
 * the web app uses (shared/schemas/*), and parsing must not drop anything, so
 * a field the server adds, removes, renames or retypes without changing the
 * schema fails the test.
 */
import assert from "node:assert/strict";
import type { z } from "zod";

export function assertContract<T>(schema: z.ZodType<T>, body: unknown, what: string): T {
  const r = schema.safeParse(body);
  if (!r.success)
    assert.fail(
      `${what} does not match its shared schema: ${r.error.issues.map((i) => `${i.path.join(".") || "(root)"}: ${i.message}`).join("; ")}`,
    );
  assert.deepEqual(r.data, body, `${what} carries fields its shared schema does not declare`);
  return r.data;
}
