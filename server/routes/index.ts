/** The route table: every API route of the app (the authorization test walks it). */
import type { RouteDef } from "./route-table";
import { healthRoutes } from "./health.routes";

export const allRoutes: RouteDef[] = [...healthRoutes];
