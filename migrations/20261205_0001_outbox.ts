import type { Knex } from "knex";

// The outbox (issue 11): every e-mail Calmcrest writes, inserted in the same transaction as the change it
// reports, and sent afterwards by the mail sender (apps/server/src/mail). Plus each person's choice to receive
// comment e-mails (publication e-mails cannot be turned off).
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("outbox", (table) => {
    table.increments("id");
    table.text("kind").notNullable();
    table.text("to_address").notNullable();
    table.text("to_user_id").references("id").inTable("user").onDelete("SET NULL");
    table.text("subject").notNullable();
    table.text("text_body").notNullable();
    table.text("html_body").notNullable();
    table.text("links").notNullable().defaultTo("[]"); // JSON [{ label, url }]
    table.text("status").notNullable().checkIn(["queued", "retrying", "sent", "failed"]);
    table.integer("attempts").notNullable().defaultTo(0);
    table.text("last_error");
    table.text("created_at").notNullable();
    table.text("next_attempt_at");
    table.text("sent_at");
    table.text("transport");
    table.text("message_id");
    // The sender asks "what is due?": unsent messages by due time.
    table.index(["status", "next_attempt_at"]);
  });
  await knex.schema.alterTable("user", (table) => {
    table.boolean("comment_emails").notNullable().defaultTo(true);
  });
}

export async function down(knex: Knex): Promise<void> {
  // SQLite drops a column in place (3.35+); Knex's dropColumn would rebuild the user table, which other tables refer to.
  await knex.raw("ALTER TABLE user DROP COLUMN comment_emails");
  await knex.schema.dropTableIfExists("outbox");
}
