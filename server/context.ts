/** What every route and service gets: the database, configuration and long-lived services. */
import type { Db } from "@/db/client";
import type Database from "better-sqlite3";
import type { Env } from "./env";
import type { Mailer } from "@/server/services/mail.service";
import type { RunQueue } from "@/server/compute/run-queue";
import type { ComputeService } from "@/server/compute/compute-service";

export interface AppContext {
  db: Db;
  sqlite: Database.Database;
  env: Env;
  version: string;
  mailer: Mailer;
  queue: RunQueue;
  /** Request-time ODE work (threshold, estimate, control), off the event loop with a budget. */
  compute: ComputeService;
  /** Size of the compute pool (threads). */
  poolSize: number;
}
