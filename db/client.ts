import fs from "node:fs";
import path from "node:path";
import Database from "better-sqlite3";
import { drizzle, type BetterSQLite3Database } from "drizzle-orm/better-sqlite3";
import * as schema from "./schema";

export type Db = BetterSQLite3Database<typeof schema> & { $client: Database.Database };

export const DEFAULT_DATABASE_URL = "data/airkeep.db";

export function databasePath(url = process.env.DATABASE_URL ?? DEFAULT_DATABASE_URL): string {
  return path.resolve(url.replace(/^file:/, ""));
}

export function openDatabase(file = databasePath()): Db {
  fs.mkdirSync(path.dirname(file), { recursive: true });
  const sqlite = new Database(file);
  sqlite.pragma("journal_mode = WAL");
  sqlite.pragma("busy_timeout = 5000");
  sqlite.pragma("synchronous = NORMAL");
  sqlite.pragma("foreign_keys = ON");
  return drizzle(sqlite, { schema }) as Db;
}

const globalForDb = globalThis as unknown as { airkeepDb?: Db };

/** The process-wide connection (one per process; survives hot reload in development). */
export function getDb(): Db {
  globalForDb.airkeepDb ??= openDatabase();
  return globalForDb.airkeepDb;
}
