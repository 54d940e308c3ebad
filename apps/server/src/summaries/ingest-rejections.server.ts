import type { Knex } from "knex";
import type { IngestRejections } from "./summarize.server";

/** Rows rejected at ingest by the campaigns' finished uploads, by reason. */
export async function ingestRejections(knex: Knex, campaignIds: readonly number[]): Promise<IngestRejections> {
  const rows = await knex("upload")
    .whereIn("campaign_id", campaignIds)
    .andWhere({ status: "done" })
    .select<{ rows_read: number; samples_accepted: number; rejected_by_reason: string }[]>("rows_read", "samples_accepted", "rejected_by_reason");
  const rejectedByReason: Record<string, number> = {};
  let rejected = 0;
  for (const row of rows) {
    rejected += row.rows_read - row.samples_accepted;
    for (const [reason, count] of Object.entries(JSON.parse(row.rejected_by_reason) as Record<string, number>)) {
      rejectedByReason[reason] = (rejectedByReason[reason] ?? 0) + count;
    }
  }
  return { rejected, rejectedByReason };
}
