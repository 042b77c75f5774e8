import Database from "better-sqlite3";
import { Kysely, Migrator, SqliteDialect, type MigrationProvider } from "kysely";
import { mkdirSync } from "node:fs";
import { dirname, resolve } from "node:path";
import { migrations } from "@/migrations";
import type { Database as Schema } from "./schema";

export type Db = Kysely<Schema>;

/** The database file: PARITAS_DB_FILE, default ./data/paritas.db. */
export function databaseFile(): string {
  return process.env.PARITAS_DB_FILE ?? "./data/paritas.db";
}

export function openDb(file: string = databaseFile()): Db {
  if (file !== ":memory:") mkdirSync(dirname(resolve(/*turbopackIgnore: true*/ file)), { recursive: true });
  const sqlite = new Database(file);
  sqlite.pragma("journal_mode = WAL");
  sqlite.pragma("busy_timeout = 5000");
  sqlite.pragma("foreign_keys = ON");
  sqlite.pragma("synchronous = NORMAL");
  return new Kysely<Schema>({ dialect: new SqliteDialect({ database: sqlite }) });
}

const provider: MigrationProvider = { getMigrations: async () => migrations };

export async function migrate(db: Db): Promise<void> {
  const { error, results } = await new Migrator({ db, provider }).migrateToLatest();
  if (error) {
    const failed = results?.find((r) => r.status === "Error")?.migrationName;
    throw new Error(`migration ${failed ?? "?"} failed: ${String(error)}`);
  }
}

// One connection per process, migrated once before first use.
const state = globalThis as unknown as { __paritasDb?: { db: Db; ready: Promise<void> } };

function instance() {
  if (!state.__paritasDb) {
    const db = openDb();
    state.__paritasDb = { db, ready: migrate(db) };
  }
  return state.__paritasDb;
}

/** The process-wide database, migrated. */
export async function getDb(): Promise<Db> {
  const { db, ready } = instance();
  await ready;
  return db;
}

/** Close the process-wide connection (tests, scripts). */
export async function closeDb(): Promise<void> {
  const s = state.__paritasDb;
  state.__paritasDb = undefined;
  if (s) await s.db.destroy();
}

export const nowIso = () => new Date().toISOString();

/** Run `fn` in a transaction: the caller's, when `db` already is one, else a new one. */
export function inTransaction<T>(db: Db, fn: (tx: Db) => Promise<T>): Promise<T> {
  return db.isTransaction ? fn(db) : db.transaction().execute(fn);
}
