/**
 * Redis for tests: `redisSkipReason()` is non-null only when redis-server is
 * absent outside CI (in CI, `.ci/run` installs it and a missing one fails the
 * test file instead of skipping it). The server and worker processes come from
 * scripts/lib/redis-process.ts (shared with the benchmark).
 */
import { REDIS_BIN } from "@/scripts/lib/redis-process";

export { startRedis, startWorker, stopWorker } from "@/scripts/lib/redis-process";
export type { RedisHandle, WorkerProcess } from "@/scripts/lib/redis-process";

export function redisSkipReason(): string | null {
  if (REDIS_BIN) return null;
  if (process.env.CI)
    throw new Error("redis-server is not installed, and CI must run the Redis tests (.ci/run installs it)");
  return "redis-server is not installed (apt-get install redis-server); the distributed-mode tests are skipped outside CI";
}
