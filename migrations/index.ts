import type { Knex } from "knex";
import * as usersAndSessions from "./20261201_0001_users_and_sessions";
import * as sitesCampaignsUploads from "./20261202_0001_sites_campaigns_uploads";
import * as hashSessionIds from "./20261203_0001_hash_session_ids";
import * as outbox from "./20261205_0001_outbox";
import * as campaignDataVersion from "./20261205_0002_campaign_data_version";
import * as reports from "./20261205_0001_reports";
import * as uploadWithdrawal from "./20261205_0003_upload_withdrawal";
import * as uploadReadOptions from "./20261205_0004_upload_read_options";
import * as accounts from "./20261205_0002_accounts";

interface Migration {
  up(knex: Knex): Promise<void>;
  down(knex: Knex): Promise<void>;
}

// Migrations are listed here in order (imported statically, so they run the same under tsx, vitest and a bundle).
// To add one: create `YYYYMMDD_NNNN_what_it_does.ts` beside this file and append it below.
const migrations: [name: string, migration: Migration][] = [
  ["20261201_0001_users_and_sessions", usersAndSessions],
  ["20261202_0001_sites_campaigns_uploads", sitesCampaignsUploads],
  ["20261203_0001_hash_session_ids", hashSessionIds],
  ["20261205_0001_outbox", outbox],
  ["20261205_0002_campaign_data_version", campaignDataVersion],
  ["20261205_0001_reports", reports],
  ["20261205_0003_upload_withdrawal", uploadWithdrawal],
  ["20261205_0004_upload_read_options", uploadReadOptions],
  ["20261205_0002_accounts", accounts],
];

export const migrationSource: Knex.MigrationSource<string> = {
  getMigrations: async () => migrations.map(([name]) => name),
  getMigrationName: (name) => name,
  getMigration: async (name) => {
    const found = migrations.find(([candidate]) => candidate === name);
    if (!found) throw new Error(`Unknown migration ${name}`);
    return found[1];
  },
};
