import type { Knex } from "knex";

// Accounts that can be invited, deactivated and reset (never deleted, so the audit log and comments keep their
// author), one-time password links stored only as hashes, and an audit log the application cannot rewrite.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable("user", (table) => {
    // active | invited (no password chosen yet) | deactivated (cannot sign in; sessions ended)
    table.text("status").notNullable().defaultTo("active");
    table.text("last_sign_in_at");
  });
  await knex.schema.createTable("account_token", (table) => {
    table.increments("id");
    table.text("user_id").notNullable().references("id").inTable("user").onDelete("CASCADE");
    table.text("purpose").notNullable().checkIn(["invite", "reset"]);
    // SHA-256 of the token in the link: a copy of the database holds no link anyone could use.
    table.text("token_hash").notNullable().unique();
    table.text("created_at").notNullable();
    table.text("expires_at").notNullable();
    table.text("used_at");
    table.index(["user_id"]);
  });
  await knex.schema.alterTable("audit_log", (table) => {
    table.index(["user_id", "id"]);
    table.index(["action", "id"]);
  });
  // Audit rows are written once and never changed or removed by Calmcrest.
  await knex.raw(`CREATE TRIGGER audit_log_no_update BEFORE UPDATE ON audit_log BEGIN SELECT RAISE(ABORT, 'audit_log rows are never updated'); END`);
  await knex.raw(`CREATE TRIGGER audit_log_no_delete BEFORE DELETE ON audit_log BEGIN SELECT RAISE(ABORT, 'audit_log rows are never deleted'); END`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw("DROP TRIGGER IF EXISTS audit_log_no_delete");
  await knex.raw("DROP TRIGGER IF EXISTS audit_log_no_update");
  await knex.schema.alterTable("audit_log", (table) => {
    table.dropIndex(["user_id", "id"]);
    table.dropIndex(["action", "id"]);
  });
  await knex.schema.dropTable("account_token");
  await knex.schema.alterTable("user", (table) => {
    table.dropColumn("last_sign_in_at");
    table.dropColumn("status");
  });
}
