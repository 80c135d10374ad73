/**
 * createApp: the Express application, middleware in order on one screen.
 * Testable without a port (supertest) and without a web build.
 */
import express, { Router } from "express";
import compression from "compression";
import { existsSync } from "node:fs";
import { constants as zlibConstants } from "node:zlib";
import { resolve, join } from "node:path";
import type { AppContext } from "./context";
import { API_LIMITS } from "@/shared/limits";
import { apiNotFound, errorHandler } from "@/server/middleware/error-handler";
import { csrfGuard } from "@/server/middleware/csrf";
import { isSbmlImportPath } from "@/server/middleware/sbml-body";
import { installAuth } from "@/server/middleware/session";
import { mountRoutes } from "@/server/routes/route-table";
import { allRoutes } from "@/server/routes";

export function createApp(ctx: AppContext) {
  const app = express();
  app.disable("x-powered-by");
  app.set("trust proxy", "loopback");
  // API answers are small, per-request JSON: the fastest deflate level (a few per cent larger than the
  // default level 6 at a fraction of the CPU); the web build's files keep the default level.
  const apiCompression = compression({ level: zlibConstants.Z_BEST_SPEED });
  const webCompression = compression();
  app.use((req, res, next) => (req.path.startsWith("/api/") ? apiCompression : webCompression)(req, res, next));
  // No ETag on res.json/res.send: API answers are Cache-Control: no-store, so the hash of every body was never
  // used (static files keep their own ETags).
  app.set("etag", false);

  // ---- API
  const api = Router();
  // The SBML import parses its own body after the access check, with its own size rule (server/middleware/sbml-body.ts).
  const json = express.json({ limit: API_LIMITS.maxJsonBodyBytes });
  api.use((req, res, next) => (isSbmlImportPath(req.path) ? next() : json(req, res, next)));
  api.use((_req, res, next) => {
    res.setHeader("Cache-Control", "no-store");
    next();
  });
  api.use(csrfGuard);
  installAuth(api, ctx);
  mountRoutes(api, ctx, allRoutes);
  api.use(apiNotFound);
  app.use("/api", api);

  // ---- Web build (client-side routing: every other path gets the app's HTML)
  const dist = resolve(ctx.env.LINGER_WEB_DIST);
  const indexHtml = join(dist, "index.html");
  app.use(express.static(dist, { index: false, maxAge: "1h" }));
  app.get("/{*splat}", (_req, res) => {
    if (existsSync(indexHtml)) {
      res.setHeader("Cache-Control", "no-cache");
      res.sendFile(indexHtml);
    } else {
      res
        .status(200)
        .type("html")
        .send(
          "<!doctype html><title>Linger</title><p>Linger: the web build is missing. Run <code>npm run build:web</code>.</p>",
        );
    }
  });
  app.use(errorHandler);
  return app;
}
