import type { Knex } from "knex";

// How an upload's file is read beyond its column mapping: the time format and a whole file's UTC offset (JSON
// { timeFormat, utcOffsetMinutes }; NULL: ISO 8601 UTC, as before). Kept with the upload so a retry or a re-read
// reads the stored file the same way. A plain ADD COLUMN (no table rebuild: `sample` rows refer to `upload`).
export async function up(knex: Knex): Promise<void> {
  await knex.raw("ALTER TABLE upload ADD COLUMN read_options TEXT");
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw("ALTER TABLE upload DROP COLUMN read_options");
}
