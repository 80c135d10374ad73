/**
 * Exposure: the database, its WAL and backups are owner-only (0600, they hold password hashes and sign-in
 * tokens); the server listens on loopback unless HOST says otherwise; demo accounts (published passwords)
 * are not seeded on a non-loopback HOST unless LINGER_SEED_DEMO=1 is given explicitly.
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { mkdtempSync, statSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { openDatabase } from "@/db/client";
import { isLoopbackHost, parseEnv } from "@/server/env";
import { backupDatabase } from "@/server/routes/admin.routes";
import { makeTestContext } from "@/tests/helpers/test-app";

const envOf = (e: Record<string, string>) => parseEnv(e as unknown as NodeJS.ProcessEnv);
const mode = (p: string) => statSync(p).mode & 0o777;

test("a new database file and its WAL are created 0600; an existing world-readable one is tightened", () => {
  const dir = mkdtempSync(join(tmpdir(), "linger-mode-"));
  const file = join(dir, "sub", "linger.db");
  const h = openDatabase(file);
  h.sqlite.prepare("CREATE TABLE IF NOT EXISTS probe (x)").run();
  assert.equal(mode(file).toString(8), "600");
  assert.equal(mode(file + "-wal").toString(8), "600");
  h.close();
  const old = join(dir, "old.db");
  writeFileSync(old, "", { mode: 0o644 });
  openDatabase(old).close();
  assert.equal(mode(old).toString(8), "600");
});

test("a backup file is created 0600", async () => {
  const t = await makeTestContext({ seed: "none" });
  try {
    const b = await backupDatabase(t.ctx);
    assert.ok(b.bytes > 0);
    assert.equal(mode(b.path).toString(8), "600");
  } finally {
    await t.close();
  }
});

test("HOST defaults to loopback; demo seeding only on loopback unless LINGER_SEED_DEMO=1", () => {
  const d = envOf({});
  assert.equal(d.HOST, "127.0.0.1");
  assert.equal(d.LINGER_SEED_DEMO, true);
  assert.equal(d.seedRefused, null);
  const open = envOf({ HOST: "0.0.0.0" });
  assert.equal(open.LINGER_SEED_DEMO, false);
  assert.match(open.seedRefused!, /HOST=0\.0\.0\.0.*LINGER_SEED_DEMO=1/);
  const forced = envOf({ HOST: "0.0.0.0", LINGER_SEED_DEMO: "1" });
  assert.equal(forced.LINGER_SEED_DEMO, true);
  assert.equal(forced.seedRefused, null);
  assert.equal(envOf({ LINGER_SEED_DEMO: "0" }).LINGER_SEED_DEMO, false);
  for (const h of ["localhost", "127.0.0.1", "127.1.2.3", "::1", "[::1]"]) assert.ok(isLoopbackHost(h), h);
  for (const h of ["0.0.0.0", "::", "192.168.1.5", "example.org", "128.0.0.1"]) assert.ok(!isLoopbackHost(h), h);
});
