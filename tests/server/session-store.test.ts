/**
 * The session store writes a session's expiry again only when it moves by more than TOUCH_EVERY_MS:
 * express-session touches the store on every request, and a read must not cost a database write.
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import Database from "better-sqlite3";
import type { SessionData } from "express-session";
import { SqliteSessionStore, TOUCH_EVERY_MS } from "@/server/middleware/session";

test("touch writes the expiry at most once per TOUCH_EVERY_MS of movement, and a set always writes", () => {
  const db = new Database(":memory:");
  db.exec("create table sessions (sid text primary key, data text not null, expires_at integer not null)");
  const store = new SqliteSessionStore(db);
  const stored = () => (db.prepare("select expires_at as e from sessions where sid = 's'").get() as { e: number }).e;
  const sess = (expires: number) => ({ cookie: { expires: new Date(expires) } }) as unknown as SessionData;
  const t0 = Date.now() + 24 * 3600 * 1000; // in the future: expired rows are pruned on writes
  store.set("s", sess(t0));
  assert.equal(stored(), t0);
  store.touch("s", sess(t0 + TOUCH_EVERY_MS - 1));
  assert.equal(stored(), t0, "a touch within the interval is not written");
  store.touch("s", sess(t0 + TOUCH_EVERY_MS + 1));
  assert.equal(stored(), t0 + TOUCH_EVERY_MS + 1, "a touch beyond it is");
  store.set("s", sess(t0 + TOUCH_EVERY_MS + 2));
  assert.equal(stored(), t0 + TOUCH_EVERY_MS + 2, "a set always writes");
  db.close();
});
