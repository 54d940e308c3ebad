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
