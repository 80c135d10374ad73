/**
 * Statements for the queries every request makes (the session user, lab role, owning lab), built and
 * prepared once per database instead of once per call: Drizzle builds the SQL and better-sqlite3
 * prepares it again on every `.get()` of an unprepared query.
 */
import type { AppContext } from "@/server/context";

const byDb = new WeakMap<object, Map<string, unknown>>();

/** The statement `build` makes, made once for this context's database under `key`. */
export function preparedOnce<T>(ctx: AppContext, key: string, build: () => T): T {
  let m = byDb.get(ctx.db);
  if (!m) byDb.set(ctx.db, (m = new Map()));
  let st = m.get(key) as T | undefined;
  if (st === undefined) m.set(key, (st = build()));
  return st;
}
