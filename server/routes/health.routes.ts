import { defineRoutes } from "./route-table";

export const healthRoutes = defineRoutes([
  {
    method: "get",
    path: "/health",
    access: { kind: "public" },
    summary: "App version, database state and worker-pool size.",
    handler: ({ ctx }) => {
      let database: "ok" | "error" = "ok";
      let journalMode = "";
      try {
        journalMode = String(ctx.sqlite.pragma("journal_mode", { simple: true }));
        ctx.sqlite.prepare("select 1").get();
      } catch {
        database = "error";
      }
      return {
        status: database === "ok" ? "ok" : "degraded",
        version: ctx.version,
        database: { state: database, journalMode },
        pool: { threads: ctx.poolSize, ...ctx.queue.stats() },
      };
    },
  },
]);
