import type { Knex } from "knex";

// From now on sessions are stored under the SHA-256 of the cookie's token, not the token itself (a copy of the
// database then holds no usable session). Sessions created before had the token as their id: they are removed,
// so none stays usable from a copy; everybody signs in once more after the upgrade.
export async function up(knex: Knex): Promise<void> {
  await knex("session").delete();
}

// Hashed ids are not valid under the old scheme: rolling back signs everybody out too.
export async function down(knex: Knex): Promise<void> {
  await knex("session").delete();
}
