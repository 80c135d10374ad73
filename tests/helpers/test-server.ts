/**
 * The real server process for browser and crash tests (scripts/lib/spawn-server.ts,
 * shared with the benchmark) on a free port, with the demo lab:
 *   - startTestServer(): on its own copy of the seeded demo database
 *     (tests/helpers/demo-database.ts: made once per source tree, its demo runs and
 *     sweep already computed), in a fresh temp folder removed by stop();
 *   - startTestServer({ database: "fresh" }): on an empty file, seeded at start as a
 *     new install is (the demo runs then compute in the background);
 *   - startTestServer({ dir, dbPath }): on an existing file (a restart).
 */
import { copyFileSync, mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { startServerProcess, type ServerProcess } from "@/scripts/lib/spawn-server";
import { ensureDemoDatabase } from "./demo-database";

export { DEMO_PASSWORD, type ServerProcess as TestServer } from "@/scripts/lib/spawn-server";

export async function startTestServer(
  opts: Parameters<typeof startServerProcess>[0] & { database?: "demo-copy" | "fresh" } = {},
): Promise<ServerProcess> {
  const { database = "demo-copy", ...rest } = opts;
  if (database === "fresh" || rest.dbPath) return startServerProcess(rest);
  const source = await ensureDemoDatabase();
  const dir = mkdtempSync(join(tmpdir(), "linger-server-"));
  const dbPath = join(dir, "linger.db");
  try {
    copyFileSync(source, dbPath);
    const server = await startServerProcess({ ...rest, dir, dbPath });
    return {
      ...server,
      async stop(o = {}) {
        await server.stop(o);
        if (!o.keepFiles) rmSync(dir, { recursive: true, force: true });
      },
    };
  } catch (e) {
    rmSync(dir, { recursive: true, force: true });
    throw e;
  }
}
