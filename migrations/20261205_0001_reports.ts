import type { Knex } from "knex";

// Committee reports (issue 11): reports and their working sections, frozen versions, sharing, and comments.
// Times are ISO text. A version's content is a JSON snapshot and is never updated; comments are never deleted
// (a withdrawn comment keeps its text, hidden).
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("report", (table) => {
    table.increments("id");
    table.text("title").notNullable();
    table.text("summary").notNullable().defaultTo("");
    // The Compare page's settings as an object of strings (JSON): what a publication computes.
    table.text("comparison_query").notNullable();
    // The report's lead: who gets "new comment" e-mails.
    table.text("lead_id").references("id").inTable("user").onDelete("SET NULL");
    table.text("share_mode").notNullable().checkIn(["all", "named"]).defaultTo("all");
    table.text("created_at").notNullable();
    table.text("updated_at").notNullable();
  });

  await knex.schema.createTable("report_share", (table) => {
    table.integer("report_id").notNullable().references("id").inTable("report").onDelete("CASCADE");
    table.text("user_id").notNullable().references("id").inTable("user").onDelete("CASCADE");
    table.primary(["report_id", "user_id"]);
  });

  // The working copy's sections (the next version's text). Deleting a section here never touches a version.
  await knex.schema.createTable("report_section", (table) => {
    table.increments("id");
    table.integer("report_id").notNullable().references("id").inTable("report").onDelete("CASCADE");
    table.integer("position").notNullable();
    table.text("title").notNullable();
    table.text("body").notNullable().defaultTo("");
    table.boolean("deleted").notNullable().defaultTo(false);
    table.text("updated_at").notNullable();
    table.index(["report_id", "position"]);
  });

  await knex.schema.createTable("report_version", (table) => {
    table.increments("id");
    table.integer("report_id").notNullable().references("id").inTable("report").onDelete("RESTRICT");
    table.integer("number").notNullable();
    table.text("published_at").notNullable();
    table.text("published_by").references("id").inTable("user").onDelete("SET NULL");
    table.text("note").notNullable().defaultTo("");
    table.text("title").notNullable();
    table.text("summary").notNullable();
    table.text("sections").notNullable(); // JSON [{ id, title, body }]
    table.text("comparison_query").notNullable(); // JSON, as on the report then
    table.text("comparison").notNullable(); // JSON ComparisonResponse, frozen
    table.text("upload_ids").notNullable(); // JSON [id]: the uploads the numbers came from
    table.unique(["report_id", "number"]);
  });

  await knex.schema.createTable("report_comment", (table) => {
    table.increments("id");
    table.integer("report_id").notNullable().references("id").inTable("report").onDelete("RESTRICT");
    table.integer("section_id").references("id").inTable("report_section").onDelete("RESTRICT");
    table.integer("version_number").notNullable();
    table.integer("parent_id").references("id").inTable("report_comment").onDelete("RESTRICT");
    table.text("author_id").references("id").inTable("user").onDelete("SET NULL");
    table.text("body").notNullable();
    table.text("created_at").notNullable();
    table.text("edited_at");
    table.text("withdrawn_at");
    // On a thread's first comment only.
    table.text("resolved_at");
    table.text("resolved_by").references("id").inTable("user").onDelete("SET NULL");
    table.index(["report_id"]);
    table.index(["parent_id"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const name of ["report_comment", "report_version", "report_section", "report_share", "report"]) await knex.schema.dropTableIfExists(name);
}
