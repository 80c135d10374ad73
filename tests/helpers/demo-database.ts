/**
 * The seeded demo database, made once per source tree and copied for each test
 * server (tests/helpers/test-server.ts), so browser tests do not each seed the
 * demo lab and simulate its demo runs and sweep again.
 *
 * It is made by the product itself: the real server process starts on an empty
 * file with demo seeding on, computes the demo runs and the demo sweep, and is
 * stopped cleanly; the file is then checkpointed (no -wal or -shm left beside it).
 * It lives in tmp/demo-db/<key>/linger.db, where the key hashes every file that
 * can change what seeding writes (server/, sim/, db/, drizzle/, shared/, the
 * lockfile, this helper and the server launcher), so a code change makes a fresh
 * one. Delete tmp/demo-db to force one by hand.
 *
 * Two test processes may ask at once: the first takes tmp/demo-db/<key>.lock
 * (created exclusively, holding its pid) and builds; the others wait for
 * tmp/demo-db/<key>/ to appear. A lock left by a process that died is taken over.
 */
import Database from "better-sqlite3";
import { createHash } from "node:crypto";
import {
  closeSync,
  existsSync,
  mkdirSync,
  openSync,
  readdirSync,
  readFileSync,
  renameSync,
  rmSync,
  statSync,
  writeSync,
} from "node:fs";
import { join, relative, resolve } from "node:path";
import { DEMO_PASSWORD, startServerProcess } from "@/scripts/lib/spawn-server";

const ROOT = resolve(__dirname, "..", "..");
export const DEMO_DB_ROOT = join(ROOT, "tmp", "demo-db");
const KEY_INPUTS = [
  "server",
  "sim",
  "db",
  "drizzle",
  "shared",
  "package-lock.json",
  "tests/helpers/demo-database.ts",
  "scripts/lib/spawn-server.ts",
];
/** Long enough for the demo runs and sweep on a busy 2-core machine; a build that takes longer is a failure. */
const BUILD_TIMEOUT_MS = 20 * 60_000;
const POLL_MS = 500;

/** A hash of the files that decide what demo seeding writes (16 hex digits). */
export function demoDatabaseKey(): string {
  const h = createHash("sha256");
  const walk = (abs: string) => {
    if (!existsSync(abs)) return;
    if (statSync(abs).isDirectory()) {
      for (const name of readdirSync(abs).sort()) {
        if (name === "node_modules" || name.startsWith(".")) continue;
        walk(join(abs, name));
      }
      return;
    }
    h.update(relative(ROOT, abs) + "\0");
    h.update(readFileSync(abs));
    h.update("\0");
  };
  for (const p of KEY_INPUTS) walk(join(ROOT, p));
  return h.digest("hex").slice(0, 16);
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

function processAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === "EPERM";
  }
}

/** Takes the lock file, or returns false when a live process holds it (a dead holder's lock is removed). */
function tryLock(lockPath: string): boolean {
  try {
    const fd = openSync(lockPath, "wx");
    writeSync(fd, String(process.pid));
    closeSync(fd);
    return true;
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code !== "EEXIST") throw e;
  }
  let holder = NaN;
  try {
    holder = Number(readFileSync(lockPath, "utf8"));
  } catch {
    return false; // released between the two calls: try again on the next poll
  }
  const mtimeMs = statSync(lockPath, { throwIfNoEntry: false })?.mtimeMs;
  if (mtimeMs === undefined) return false; // released meanwhile
  // An empty file is a holder between creating and writing it; give it a moment before calling it dead.
  const young = Date.now() - mtimeMs < 5_000;
  if (Number.isInteger(holder) && holder > 0 ? !processAlive(holder) : !young) rmSync(lockPath, { force: true });
  return false;
}

/**
 * The path of the seeded demo database for the current source tree, built first
 * if it is missing (or waited for while another process builds it). Copy it;
 * never open it in place.
 */
export async function ensureDemoDatabase(opts: { log?: (line: string) => void } = {}): Promise<string> {
  const key = demoDatabaseKey();
  const dir = join(DEMO_DB_ROOT, key);
  const file = join(dir, "linger.db");
  const lockPath = join(DEMO_DB_ROOT, `${key}.lock`);
  mkdirSync(DEMO_DB_ROOT, { recursive: true });
  const deadline = Date.now() + BUILD_TIMEOUT_MS;
  let waited = false;
  for (;;) {
    if (existsSync(file)) return file; // the folder is renamed into place only when complete
    if (tryLock(lockPath)) {
      try {
        if (existsSync(file)) return file;
        opts.log?.(`demo database: seeding tmp/demo-db/${key} (demo runs and sweep computed once for the suite)`);
        const t0 = Date.now();
        await buildDemoDatabase(key, dir);
        opts.log?.(`demo database: ready in ${Math.round((Date.now() - t0) / 1000)} s`);
        return file;
      } finally {
        rmSync(lockPath, { force: true });
      }
    }
    if (!waited) opts.log?.("demo database: another process is seeding it; waiting");
    waited = true;
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${lockPath} to be released`);
    await sleep(POLL_MS);
  }
}

/** Counts of the demo content still being computed, and the runs that ended without results (failed, cancelled). */
function progress(sqlite: Database.Database): { active: number; runs: number; notFinished: string[] } {
  const active = sqlite
    .prepare(
      `SELECT (SELECT count(*) FROM runs WHERE status IN ('queued', 'running')) +
              (SELECT count(*) FROM sweeps WHERE status IN ('queued', 'running')) AS n`,
    )
    .get() as { n: number };
  const runs = sqlite.prepare("SELECT count(*) AS n FROM runs").get() as { n: number };
  const notFinished = (
    sqlite
      .prepare(
        "SELECT name, status, status_reason AS reason FROM runs WHERE status NOT IN ('queued', 'running', 'finished', 'capped')",
      )
      .all() as { name: string; status: string; reason: string | null }[]
  ).map((r) => `${r.name}: ${r.status}${r.reason ? ` (${r.reason})` : ""}`);
  return { active: active.n, runs: runs.n, notFinished };
}

async function buildDemoDatabase(key: string, dir: string): Promise<void> {
  // Other keys' databases (older source trees) and half-built folders of processes that died go first.
  for (const name of readdirSync(DEMO_DB_ROOT)) {
    if (name === `${key}.lock`) continue; // ours
    const path = join(DEMO_DB_ROOT, name);
    if (name.endsWith(".lock")) {
      let holder = NaN;
      try {
        holder = Number(readFileSync(path, "utf8"));
      } catch {
        continue; // released meanwhile
      }
      if (Number.isInteger(holder) && holder > 0 && !processAlive(holder)) rmSync(path, { force: true });
      continue;
    }
    const pid = /\.building-(\d+)$/.exec(name)?.[1];
    if (pid && processAlive(Number(pid))) continue;
    rmSync(path, { recursive: true, force: true });
  }
  const work = join(DEMO_DB_ROOT, `${key}.building-${process.pid}`);
  rmSync(work, { recursive: true, force: true });
  mkdirSync(work, { recursive: true });
  const dbPath = join(work, "linger.db");
  try {
    const server = await startServerProcess({
      dir: work,
      dbPath,
      env: { LINGER_SEED_DEMO: "1", LINGER_DEMO_PASSWORD: DEMO_PASSWORD, LINGER_POOL_SIZE: "2", LINGER_TEST: "1" },
      timeoutMs: 5 * 60_000,
    });
    try {
      // Seeding finishes before the server listens: the runs and the sweep are in the file, queued.
      const reader = new Database(dbPath, { readonly: true, fileMustExist: true });
      try {
        const deadline = Date.now() + BUILD_TIMEOUT_MS;
        for (;;) {
          const p = progress(reader);
          if (p.notFinished.length) throw new Error(`demo runs did not finish: ${p.notFinished.join("; ")}`);
          if (p.runs > 0 && p.active === 0) break;
          if (p.runs === 0) throw new Error("demo seeding queued no runs");
          if (server.child.exitCode !== null) throw new Error(`the server exited while computing the demo runs`);
          if (Date.now() > deadline)
            throw new Error(`demo runs still computing after ${BUILD_TIMEOUT_MS / 60_000} min`);
          await sleep(POLL_MS);
        }
      } finally {
        reader.close();
      }
    } catch (e) {
      throw new Error(`${(e as Error).message}\nserver output:\n${server.output()}`);
    } finally {
      await server.stop({ keepFiles: true });
    }
    if (server.child.exitCode !== 0)
      throw new Error(
        `the server stopped with ${server.child.exitCode ?? server.child.signalCode}:\n${server.output()}`,
      );
    // The server closed its connection cleanly; fold any WAL left into the file all the same, so one file is the copy.
    const sqlite = new Database(dbPath);
    sqlite.pragma("wal_checkpoint(TRUNCATE)");
    const check = sqlite.pragma("quick_check", { simple: true });
    sqlite.close();
    if (check !== "ok") throw new Error(`the demo database fails quick_check: ${check}`);
    for (const suffix of ["-wal", "-shm"]) rmSync(dbPath + suffix, { force: true });
    rmSync(dir, { recursive: true, force: true }); // a folder without its file (removed by hand) is no database
    renameSync(work, dir);
  } catch (e) {
    rmSync(work, { recursive: true, force: true });
    throw e;
  }
}
