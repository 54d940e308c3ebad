import { mkdirSync } from "node:fs";
import { join } from "node:path";
import Database from "better-sqlite3";
import knexFactory, { type Knex } from "knex";
import { migrationSource } from "@calmcrest/migrations";
import { tune } from "./tune.server";

export interface AppDatabase {
  knex: Knex;
  /** A raw better-sqlite3 handle on the same file, for Lucia's adapter and bulk inserts. */
  sqlite: Database.Database;
  file: string;
  close(): Promise<void>;
}

/** How many distinct SQL texts keep their prepared statement on Knex's connection (the least recently used go first). */
const PREPARED_STATEMENTS_KEPT = 500;

/**
 * Knex's better-sqlite3 dialect prepares every query anew, and preparing costs more than running a small query:
 * on a busy server that was the main thread's largest single cost per request. A connection passed here keeps the
 * statements of the last PREPARED_STATEMENTS_KEPT SQL texts. Only for connections whose statements are run to
 * completion at once (get(), all() or run(), never an open iterate()) with no per-use settings: Knex's (it sets
 * nothing but safeIntegers, and only when asked, which Calmcrest never does) and the session adapter's.
 */
export function reusePreparedStatements(connection: Database.Database): void {
  const prepare = connection.prepare.bind(connection);
  const kept = new Map<string, Database.Statement>();
  connection.prepare = ((sql: string) => {
    const statement = kept.get(sql);
    if (statement) {
      kept.delete(sql);
      kept.set(sql, statement);
      return statement;
    }
    const prepared = prepare(sql);
    kept.set(sql, prepared);
    if (kept.size > PREPARED_STATEMENTS_KEPT) {
      const oldest = kept.keys().next();
      if (!oldest.done) kept.delete(oldest.value);
    }
    return prepared;
  }) as Database.Database["prepare"];
}

export async function openDatabase(dataDir: string): Promise<AppDatabase> {
  mkdirSync(dataDir, { recursive: true });
  const file = join(dataDir, "calmcrest.sqlite");
  const knex = knexFactory({
    client: "better-sqlite3",
    connection: { filename: file },
    useNullAsDefault: true,
    pool: {
      min: 1,
      max: 1,
      afterCreate: (connection: Database.Database, done: (error: Error | null, connection: Database.Database) => void) => {
        tune(connection);
        reusePreparedStatements(connection);
        done(null, connection);
      },
    },
  });
  await knex.migrate.latest({ migrationSource });
  const sqlite = new Database(file);
  tune(sqlite);
  return {
    knex,
    sqlite,
    file,
    async close() {
      sqlite.close();
      await knex.destroy();
    },
  };
}
