import type { Knex } from "knex";

// Sites, campaigns, membership, uploads, samples, exclusion windows and the audit log (issue 4).
// Times of events are ISO text (readable in the sqlite shell); sample times are UTC epoch ms integers (fast ranges).
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("site", (table) => {
    table.increments("id");
    table.text("name").notNullable();
    table.double("latitude").notNullable();
    table.double("longitude").notNullable();
    table.double("elevation_m").notNullable();
    table.text("notes").notNullable().defaultTo("");
    table.text("created_by").references("id").inTable("user").onDelete("SET NULL");
    table.text("created_at").notNullable();
    table.text("updated_at").notNullable();
  });

  await knex.schema.createTable("campaign", (table) => {
    table.increments("id");
    table.integer("site_id").notNullable().references("id").inTable("site").onDelete("RESTRICT");
    table.text("name").notNullable();
    table.double("aperture_mm").notNullable();
    table.double("baseline_mm").notNullable();
    table.double("wavelength_nm").notNullable();
    table.double("pixel_scale_arcsec");
    table.double("exposure_ms");
    table.double("height_above_ground_m");
    table.text("response").notNullable().checkIn(["z-tilt", "g-tilt", "sarazin-roddier"]);
    table.text("start_date");
    table.text("end_date");
    table.text("status").notNullable().checkIn(["planned", "running", "finished"]);
    table.text("notes").notNullable().defaultTo("");
    // JSON { mapping, units? } the upload wizard offers next time.
    table.text("saved_mapping");
    table.text("created_by").references("id").inTable("user").onDelete("SET NULL");
    table.text("created_at").notNullable();
    table.text("updated_at").notNullable();
    table.index(["site_id"]);
  });

  await knex.schema.createTable("campaign_member", (table) => {
    table.integer("campaign_id").notNullable().references("id").inTable("campaign").onDelete("CASCADE");
    table.text("user_id").notNullable().references("id").inTable("user").onDelete("CASCADE");
    table.text("added_at").notNullable();
    table.primary(["campaign_id", "user_id"]);
    // Access checks ask "which campaigns may this user see?".
    table.index(["user_id"]);
  });

  await knex.schema.createTable("upload", (table) => {
    table.increments("id");
    table.integer("campaign_id").notNullable().references("id").inTable("campaign").onDelete("RESTRICT");
    table.text("file_name").notNullable();
    table.integer("size_bytes").notNullable();
    table.text("sha256").notNullable();
    table.text("uploaded_by").references("id").inTable("user").onDelete("SET NULL");
    table.text("uploaded_at").notNullable();
    table.text("mapping").notNullable(); // JSON field -> header
    table.text("status").notNullable().checkIn(["queued", "ingesting", "done", "failed", "interrupted"]);
    table.integer("rows_read").notNullable().defaultTo(0);
    table.integer("samples_accepted").notNullable().defaultTo(0);
    table.text("rejected_by_reason").notNullable().defaultTo("{}"); // JSON reason -> count
    table.text("error");
    table.text("started_at");
    table.text("finished_at");
    // The same bytes in the same campaign are one upload (409 on a second try).
    table.unique(["campaign_id", "sha256"]);
    table.index(["status"]);
  });

  // One row per accepted sample. The primary key (campaign, time) makes duplicate timestamps within a campaign
  // impossible (INSERT OR IGNORE reports them) and clusters a campaign's samples in time order, which is how the
  // summary cache reads them. WITHOUT ROWID keeps that a single B-tree (faster bulk ingest).
  await knex.raw(`
    CREATE TABLE sample (
      campaign_id INTEGER NOT NULL REFERENCES campaign(id) ON DELETE RESTRICT,
      time_ms INTEGER NOT NULL,
      upload_id INTEGER NOT NULL REFERENCES upload(id) ON DELETE RESTRICT,
      seeing_arcsec REAL NOT NULL,
      r0_cm REAL NOT NULL,
      zenith_deg REAL NOT NULL,
      seeing_long_arcsec REAL,
      seeing_trans_arcsec REAL,
      anisotropic INTEGER NOT NULL,
      sun_alt_deg REAL,
      flux REAL,
      scint_index REAL,
      tau0_ms REAL,
      theta0_arcsec REAL,
      wind_ms REAL,
      rh_pct REAL,
      PRIMARY KEY (campaign_id, time_ms)
    ) WITHOUT ROWID`);
  // No index on upload_id: uploads are never deleted, and each extra index slows the bulk ingest (measured ~20%).

  // Every rejected row of an upload, so rejected.csv can list all of them with the raw text.
  await knex.schema.createTable("upload_reject", (table) => {
    table.integer("upload_id").notNullable().references("id").inTable("upload").onDelete("CASCADE");
    table.integer("line").notNullable();
    table.text("reason").notNullable();
    table.text("message").notNullable();
    table.text("raw_line").notNullable();
    table.index(["upload_id", "line"]);
  });

  await knex.schema.createTable("exclusion", (table) => {
    table.increments("id");
    table.integer("campaign_id").notNullable().references("id").inTable("campaign").onDelete("CASCADE");
    table.integer("from_ms").notNullable();
    table.integer("to_ms").notNullable();
    table.text("reason").notNullable();
    table.text("created_by").references("id").inTable("user").onDelete("SET NULL");
    table.text("created_at").notNullable();
    table.index(["campaign_id"]);
  });

  await knex.schema.createTable("audit_log", (table) => {
    table.increments("id");
    table.text("at").notNullable();
    table.text("user_id").references("id").inTable("user").onDelete("SET NULL");
    table.text("action").notNullable(); // e.g. "site.create", "upload.retry"
    table.text("target_type").notNullable();
    table.text("target_id").notNullable();
    table.text("details").notNullable().defaultTo("{}"); // JSON
    table.index(["target_type", "target_id"]);
    table.index(["at"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const name of ["audit_log", "exclusion", "upload_reject", "sample", "upload", "campaign_member", "campaign", "site"]) {
    await knex.schema.dropTableIfExists(name);
  }
}
