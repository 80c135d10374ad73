/** The route table: every API route of the app (the authorization test walks it). */
import type { RouteDef } from "./route-table";
import { healthRoutes } from "./health.routes";
import { authRoutes } from "./auth.routes";
import { labsRoutes } from "./labs.routes";
import { adminRoutes } from "./admin.routes";
import { runRoutes } from "./runs.routes";
import { sweepRoutes } from "./sweeps.routes";
import { circuitRoutes } from "./circuits.routes";
import { sbmlRoutes } from "./sbml.routes";
import { programRoutes } from "./programs.routes";
import { traceRoutes } from "./traces.routes";
import { regimeMapRoutes } from "./regime-maps.routes";

export const allRoutes: RouteDef[] = [
  ...healthRoutes,
  ...authRoutes,
  ...labsRoutes,
  ...adminRoutes,
  ...runRoutes,
  ...sweepRoutes,
  ...circuitRoutes,
  ...sbmlRoutes,
  ...programRoutes,
  ...traceRoutes,
  ...regimeMapRoutes,
];
