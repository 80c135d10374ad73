/**
 * A real redis-server (Debian's package) on a free port in a temp folder, no
 * persistence, and forked chunk worker processes (server/worker.ts, i.e.
 * `npm run worker`). Used by the distributed-mode tests and the Redis benchmark.
 */
import { spawn, fork, type ChildProcess } from "node:child_process";
import { existsSync, mkdtempSync, rmSync } from "node:fs";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";

export const REDIS_BIN: string | undefined = ["/usr/bin/redis-server", "/usr/local/bin/redis-server"].find((p) =>
  existsSync(p),
);

async function freePort(): Promise<number> {
  return new Promise((res, rej) => {
    const s = createServer();
    s.once("error", rej);
    s.listen(0, "127.0.0.1", () => {
      const addr = s.address();
      const port = typeof addr === "object" && addr ? addr.port : 0;
      s.close(() => res(port));
    });
  });
}

export interface RedisHandle {
  url: string;
  port: number;
  /** Kills the server outright (its data is lost: nothing is saved) and starts a new one on the same port. */
  restart(downMs?: number): Promise<void>;
  stop(): Promise<void>;
}

export async function startRedis(): Promise<RedisHandle> {
  if (!REDIS_BIN) throw new Error("redis-server is not installed (apt-get install redis-server)");
  const dir = mkdtempSync(join(tmpdir(), "linger-redis-"));
  const port = await freePort();
  let proc: ChildProcess | null = null;
  const launch = () =>
    new Promise<void>((res, rej) => {
      const p = spawn(
        REDIS_BIN,
        [
          "--port",
          String(port),
          "--bind",
          "127.0.0.1",
          "--dir",
          dir,
          "--save",
          "",
          "--appendonly",
          "no",
          "--daemonize",
          "no",
        ],
        { stdio: ["ignore", "pipe", "pipe"] },
      );
      proc = p;
      let out = "";
      const timer = setTimeout(() => rej(new Error(`redis-server did not start:\n${out}`)), 10_000);
      p.stdout!.on("data", (b: Buffer) => {
        out += b.toString();
        if (out.includes("Ready to accept connections")) {
          clearTimeout(timer);
          res();
        }
      });
      p.stderr!.on("data", (b: Buffer) => (out += b.toString()));
      p.once("exit", (code) => {
        clearTimeout(timer);
        if (!out.includes("Ready to accept connections")) rej(new Error(`redis-server exited with ${code}:\n${out}`));
      });
    });
  const kill = async (signal: NodeJS.Signals) => {
    const p = proc;
    if (!p || p.exitCode !== null || p.signalCode !== null) return;
    await new Promise<void>((res) => {
      p.once("exit", () => res());
      p.kill(signal);
    });
  };
  await launch();
  return {
    url: `redis://127.0.0.1:${port}`,
    port,
    async restart(downMs = 300) {
      await kill("SIGKILL");
      await new Promise((r) => setTimeout(r, downMs));
      await launch();
    },
    async stop() {
      await kill("SIGTERM");
      rmSync(dir, { recursive: true, force: true });
    },
  };
}

export interface WorkerProcess {
  proc: ChildProcess;
  output(): string;
  /** Resolves with the exit code and signal. */
  exited: Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
}

/** Forks `npm run worker` (server/worker.ts) and resolves once it takes chunks. */
export async function startWorker(url: string, env: Record<string, string> = {}): Promise<WorkerProcess> {
  const proc = fork(resolve(__dirname, "../../server/worker.ts"), [], {
    execArgv: ["--import", "tsx"],
    env: { ...process.env, LINGER_REDIS_URL: url, LINGER_WORKER_THREADS: "1", ...env },
    stdio: ["ignore", "pipe", "pipe", "ipc"],
  });
  let out = "";
  proc.stdout!.on("data", (b: Buffer) => (out += b.toString()));
  proc.stderr!.on("data", (b: Buffer) => (out += b.toString()));
  const exited = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((res) =>
    proc.once("exit", (code, signal) => res({ code, signal })),
  );
  await new Promise<void>((res, rej) => {
    const timer = setTimeout(() => rej(new Error(`worker did not start:\n${out}`)), 30_000);
    proc.on("message", (m: any) => {
      if (m?.type === "ready") {
        clearTimeout(timer);
        res();
      }
    });
    void exited.then(({ code }) => {
      clearTimeout(timer);
      rej(new Error(`worker exited with ${code} before it was ready:\n${out}`));
    });
  });
  return { proc, output: () => out, exited };
}

export async function stopWorker(w: WorkerProcess, signal: NodeJS.Signals = "SIGTERM") {
  if (w.proc.exitCode === null && w.proc.signalCode === null) w.proc.kill(signal);
  return w.exited;
}
