import type { Knex } from "knex";

// Withdrawing, restoring and re-reading an upload (issue 13).
// - upload.withdrawn_at/_by/_reason: a withdrawn upload's samples leave every statistic; its raw file stays.
// - upload.replaces_upload_id: a re-read of a stored raw file (with a corrected mapping or monitor) points at the
//   upload it replaced; upload.monitor_override holds the corrected monitor settings (JSON) when they were given.
// - withdrawn_sample: where a withdrawn upload's samples wait (same columns as sample), so a restore puts back
//   exactly what was there, and the (campaign, time) key of `sample` is free for a re-read of the same file.
// - The same bytes in the same campaign are still one upload, but a re-read (replaces_upload_id set) is the same
//   bytes by design: the unique index now covers only first uploads.
export async function up(knex: Knex): Promise<void> {
  // Plain ADD COLUMN statements: Knex's alterTable rebuilds a SQLite table to add a column with a foreign key
  // (copy, drop, rename), and dropping `upload` fails while `sample` rows refer to it, so a database that already
  // holds uploads could not be upgraded. SQLite adds a REFERENCES column in place when its default is NULL.
  await knex.raw('ALTER TABLE upload ADD COLUMN withdrawn_at TEXT');
  await knex.raw('ALTER TABLE upload ADD COLUMN withdrawn_by TEXT REFERENCES "user"(id) ON DELETE SET NULL');
  await knex.raw('ALTER TABLE upload ADD COLUMN withdrawn_reason TEXT');
  await knex.raw("ALTER TABLE upload ADD COLUMN replaces_upload_id INTEGER REFERENCES upload(id) ON DELETE RESTRICT");
  await knex.raw("ALTER TABLE upload ADD COLUMN monitor_override TEXT");
  await knex.raw("DROP INDEX IF EXISTS upload_campaign_id_sha256_unique");
  await knex.raw("CREATE UNIQUE INDEX upload_first_of_bytes ON upload (campaign_id, sha256) WHERE replaces_upload_id IS NULL");
  await knex.raw("CREATE INDEX upload_replaces ON upload (replaces_upload_id)");
  await knex.raw(`
    CREATE TABLE withdrawn_sample (
      upload_id INTEGER NOT NULL REFERENCES upload(id) ON DELETE RESTRICT,
      campaign_id INTEGER NOT NULL REFERENCES campaign(id) ON DELETE RESTRICT,
      time_ms INTEGER NOT NULL,
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
      PRIMARY KEY (upload_id, time_ms)
    ) WITHOUT ROWID`);
}

export async function down(knex: Knex): Promise<void> {
  // Withdrawn samples go back where they were; re-reads cannot survive the old unique index, so they are refused.
  const reread = await knex("upload").whereNotNull("replaces_upload_id").first();
  if (reread) throw new Error("Cannot roll back: the database holds re-read uploads, which the older schema cannot represent.");
  await knex.raw("INSERT OR IGNORE INTO sample (campaign_id, time_ms, upload_id, seeing_arcsec, r0_cm, zenith_deg, seeing_long_arcsec, seeing_trans_arcsec, anisotropic, sun_alt_deg, flux, scint_index, tau0_ms, theta0_arcsec, wind_ms, rh_pct) SELECT campaign_id, time_ms, upload_id, seeing_arcsec, r0_cm, zenith_deg, seeing_long_arcsec, seeing_trans_arcsec, anisotropic, sun_alt_deg, flux, scint_index, tau0_ms, theta0_arcsec, wind_ms, rh_pct FROM withdrawn_sample");
  await knex.schema.dropTable("withdrawn_sample");
  await knex.raw("DROP INDEX IF EXISTS upload_replaces");
  await knex.raw("DROP INDEX IF EXISTS upload_first_of_bytes");
  await knex.raw("CREATE UNIQUE INDEX upload_campaign_id_sha256_unique ON upload (campaign_id, sha256)");
  // SQLite drops a plain column in place. The two columns with a foreign key need Knex's table rebuild, which fails
  // while samples refer to uploads (foreign keys are on): a rollback is for a database without uploads.
  for (const column of ["monitor_override", "withdrawn_reason", "withdrawn_at"]) await knex.raw(`ALTER TABLE upload DROP COLUMN ${column}`);
  await knex.schema.alterTable("upload", (table) => {
    table.dropForeign(["replaces_upload_id"]);
    table.dropColumn("replaces_upload_id");
    table.dropForeign(["withdrawn_by"]);
    table.dropColumn("withdrawn_by");
  });
}
