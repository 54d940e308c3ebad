import type { Knex } from "knex";

// One counter per campaign, raised in the same transaction as every change to the campaign's samples, exclusions
// or withdrawals (apps/server/src/summaries/data-version.server.ts). Summaries are cached under it, so a reader
// that sees the change committed also sees the new version, and never a summary of the data before it.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("campaign_data_version", (table) => {
    table.integer("campaign_id").primary().references("id").inTable("campaign").onDelete("CASCADE");
    table.integer("version").notNullable().defaultTo(0);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("campaign_data_version");
}
