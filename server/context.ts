/** What every route and service gets: the database, configuration and long-lived services. */
import type { Db } from "@/db/client";
import type Database from "better-sqlite3";
import type { Env } from "./env";
import type { Mailer } from "@/server/services/mail.service";
import type { RunQueue } from "@/server/compute/run-queue";

export interface AppContext {
  db: Db;
  sqlite: Database.Database;
  env: Env;
  version: string;
  mailer: Mailer;
  queue: RunQueue;
  /** Size of the compute pool (threads). */
  poolSize: number;
}
