/**
 * Opens the SQLite file, sets pragmas and applies migrations from drizzle/.
 */
import Database from "better-sqlite3";
import { drizzle, type BetterSQLite3Database } from "drizzle-orm/better-sqlite3";
import { migrate } from "drizzle-orm/better-sqlite3/migrator";
import { chmodSync, closeSync, existsSync, mkdirSync, openSync } from "node:fs";
import { dirname, resolve } from "node:path";
import * as schema from "./schema";

export type Db = BetterSQLite3Database<typeof schema> & { $client: Database.Database };
export interface DbHandle {
  db: Db;
  sqlite: Database.Database;
  path: string;
  close(): void;
}

export const MIGRATIONS_FOLDER = resolve(__dirname, "..", "drizzle");

export function openDatabase(path: string): DbHandle {
  const file = path === ":memory:" ? path : resolve(path);
  if (file !== ":memory:") {
    mkdirSync(dirname(file), { recursive: true, mode: 0o700 });
    restrictFile(file);
  }
  const sqlite = new Database(file);
  sqlite.pragma("journal_mode = WAL");
  sqlite.pragma("synchronous = NORMAL");
  sqlite.pragma("foreign_keys = ON");
  sqlite.pragma("busy_timeout = 5000");
  const db = drizzle(sqlite, { schema });
  migrate(db, { migrationsFolder: MIGRATIONS_FOLDER });
  return { db, sqlite, path: file, close: () => sqlite.close() };
}

/**
 * Creates the file owner-only (0600) when absent and tightens it when present: the database holds password
 * hashes and sign-in tokens. SQLite gives its -wal and -shm files the database file's permissions.
 */
export function restrictFile(file: string): void {
  if (!existsSync(file)) closeSync(openSync(file, "a", 0o600));
  chmodSync(file, 0o600);
}

export { schema };

/**
 * Runs `fn` in one SQLite transaction and returns its value; a throw rolls it back.
 * better-sqlite3 is synchronous and every query on the connection (Drizzle's `db`
 * included) inside `fn` joins the transaction; a nested call becomes a savepoint.
 */
export function inTransaction<T>(ctx: { sqlite: Database.Database }, fn: () => T): T {
  // BEGIN IMMEDIATE takes the write lock first, so a concurrent writer (another process on the same
  // file, such as the admin CLI beside a running server) is waited for under busy_timeout; a deferred
  // transaction that reads and then writes would fail at once with SQLITE_BUSY_SNAPSHOT instead.
  return ctx.sqlite.transaction(fn).immediate();
}
