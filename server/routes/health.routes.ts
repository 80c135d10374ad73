import { defineRoutes } from "./route-table";
import type { AppContext } from "@/server/context";
import { type ComputeStatus, type Health } from "@/shared/schemas/api-health";

/** Where chunks run, with every worker's details (the admin page). */
export function computeStatus(ctx: AppContext): ComputeStatus {
  const d = ctx.queue.stats().dispatch;
  return { ...d, workerCount: d.workers.length };
}

export const healthRoutes = defineRoutes([
  {
    method: "get",
    path: "/health",
    access: { kind: "public" },
    summary: "App version, database state, worker-pool size, and where chunks run (workers, queue depth, rate).",
    handler: ({ ctx }): Health => {
      let database: "ok" | "error" = "ok";
      let journalMode = "";
      try {
        journalMode = String(ctx.sqlite.pragma("journal_mode", { simple: true }));
        ctx.sqlite.prepare("select 1").get();
      } catch {
        database = "error";
      }
      const { dispatch, ...queue } = ctx.queue.stats();
      const redisDown = dispatch.redis === "disconnected";
      return {
        status: database === "ok" && !redisDown ? "ok" : "degraded",
        version: ctx.version,
        database: { state: database, journalMode },
        pool: { threads: ctx.poolSize, ...queue },
        compute: {
          ...dispatch,
          workerCount: dispatch.workers.length,
          // Host names and process ids only on the admin route.
          workers: dispatch.workers.map((w) => ({
            threads: w.threads,
            engineVersion: w.engineVersion,
            busy: w.busy,
            chunksDone: w.chunksDone,
            lastHeartbeat: w.lastHeartbeat,
          })),
        },
      };
    },
  },
]);
