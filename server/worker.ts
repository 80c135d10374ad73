/**
 * The chunk worker process (`npm run worker`): computes run chunks queued in
 * Redis by a Linger server (LINGER_REDIS_URL) on this machine's cores. Needs
 * the project installed and the Redis URL; no database, no other secrets.
 * SIGTERM/SIGINT: stop taking chunks, finish or hand back the current ones, exit.
 */
import { parseWorkerEnv } from "./env";
import { createChunkWorker } from "./compute/redis-worker";

function main() {
  let env;
  try {
    env = parseWorkerEnv();
  } catch (e) {
    console.error((e as Error).message);
    process.exit(2);
  }
  const worker = createChunkWorker({
    url: env.LINGER_REDIS_URL,
    threads: env.threads,
    lockMs: env.LINGER_WORKER_LOCK_SECONDS * 1000,
    heartbeatMs: env.LINGER_WORKER_HEARTBEAT_SECONDS * 1000,
  });
  void worker.ready.then(() => process.send?.({ type: "ready", id: worker.id }));
  let closing = false;
  const stop = async (signal: string) => {
    if (closing) return;
    closing = true;
    console.log(
      `[worker] ${signal}: finishing current chunks (up to ${env.LINGER_WORKER_DRAIN_SECONDS} s), then exiting.`,
    );
    await worker.close(env.LINGER_WORKER_DRAIN_SECONDS * 1000);
    console.log("[worker] stopped.");
    process.exit(0);
  };
  process.on("SIGINT", () => void stop("SIGINT"));
  process.on("SIGTERM", () => void stop("SIGTERM"));
}

main();
