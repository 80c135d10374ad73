/**
 * Starts the real server process (node + tsx, server/index.ts) on a free port
 * with a fresh database file (demo data seeded unless env says otherwise). Used
 * by the browser and crash-recovery tests and by the end-to-end benchmark.
 */
import { fork, type ChildProcess } from "node:child_process";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";

/** The demo password the spawned server uses unless env overrides it. */
export const DEMO_PASSWORD = "demo-password-for-tests";
const ROOT = resolve(__dirname, "..", "..");

export interface ServerProcess {
  url: string;
  port: number;
  dbPath: string;
  dir: string;
  child: ChildProcess;
  /** Graceful stop (SIGTERM), then removes the temp folder unless keepFiles. */
  stop(opts?: { keepFiles?: boolean }): Promise<void>;
  /** SIGKILL, no clean-up: for crash tests. */
  kill(): Promise<void>;
  output(): string;
}

export async function startServerProcess(
  opts: {
    env?: Record<string, string>;
    dbPath?: string;
    dir?: string;
    timeoutMs?: number;
    /** Extra Node flags for the server (profiling: --cpu-prof, --trace-opt). */
    nodeArgs?: string[];
  } = {},
): Promise<ServerProcess> {
  const dir = opts.dir ?? mkdtempSync(join(tmpdir(), "linger-server-"));
  const dbPath = opts.dbPath ?? join(dir, "linger.db");
  let out = "";
  const child = fork(join(ROOT, "server", "index.ts"), [], {
    cwd: ROOT,
    execArgv: ["--import", "tsx", ...(opts.nodeArgs ?? [])],
    env: {
      ...process.env,
      PORT: "0",
      HOST: "127.0.0.1",
      DATABASE_URL: dbPath,
      LINGER_DEMO_PASSWORD: DEMO_PASSWORD,
      LINGER_POOL_SIZE: "1",
      LINGER_SESSION_SECRET: "test-secret-0123456789abcdef",
      ...opts.env,
    },
    stdio: ["ignore", "pipe", "pipe", "ipc"],
  });
  child.stdout?.on("data", (d) => (out += d));
  child.stderr?.on("data", (d) => (out += d));
  const port = await new Promise<number>((resolvePort, reject) => {
    const timer = setTimeout(
      () => reject(new Error(`server did not start in time:\n${out}`)),
      opts.timeoutMs ?? 60_000,
    );
    child.on("message", (m: any) => {
      if (m?.type === "listening") {
        clearTimeout(timer);
        resolvePort(m.port);
      }
    });
    child.on("exit", (code) => {
      clearTimeout(timer);
      reject(new Error(`server exited with ${code}:\n${out}`));
    });
  });
  const exited = new Promise<void>((r) => child.once("exit", () => r()));
  return {
    url: `http://127.0.0.1:${port}`,
    port,
    dbPath,
    dir,
    child,
    output: () => out,
    async stop(o = {}) {
      if (child.exitCode === null && child.signalCode === null) {
        child.kill("SIGTERM");
        let grace: NodeJS.Timeout | undefined;
        await Promise.race([exited, new Promise((r) => (grace = setTimeout(r, 10_000)))]);
        clearTimeout(grace); // a pending 10 s timer would hold the caller's process (jest warns it did not exit)
        if (child.exitCode === null && child.signalCode === null) child.kill("SIGKILL");
      }
      if (!o.keepFiles && !opts.dir) rmSync(dir, { recursive: true, force: true });
    },
    async kill() {
      child.kill("SIGKILL");
      await exited;
    },
  };
}
