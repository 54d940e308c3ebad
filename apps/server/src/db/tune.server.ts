import type Database from "better-sqlite3";

/** How long a writer waits for the write lock. An ingest holds it for its whole single transaction (a few seconds for a million rows). */
export const WRITER_WAIT_MS = 60_000;

/** Settings every connection to the database file uses (Knex's, Lucia's raw handle and the ingest worker's). */
export function tune(connection: Database.Database): void {
  connection.pragma("journal_mode = WAL");
  connection.pragma("foreign_keys = ON");
  // Writers wait for each other instead of failing with SQLITE_BUSY.
  connection.pragma(`busy_timeout = ${WRITER_WAIT_MS}`);
  connection.pragma("synchronous = NORMAL");
}
