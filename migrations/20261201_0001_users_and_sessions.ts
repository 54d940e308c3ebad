import type { Knex } from "knex";

// Lucia's adapter reads `user` and `session` with these exact column names.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("user", (table) => {
    table.text("id").primary();
    table.text("email").notNullable().unique();
    table.text("name").notNullable();
    table.text("role").notNullable().checkIn(["admin", "lead", "engineer", "committee"]);
    table.text("password_hash").notNullable();
    table.text("created_at").notNullable().defaultTo(knex.fn.now());
  });
  await knex.schema.createTable("session", (table) => {
    table.text("id").primary();
    table.integer("expires_at").notNullable();
    table.text("user_id").notNullable().references("id").inTable("user").onDelete("CASCADE");
    table.index(["user_id"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("session");
  await knex.schema.dropTable("user");
}
