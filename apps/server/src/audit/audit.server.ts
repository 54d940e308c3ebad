import type { Knex } from "knex";

/** Who did what to which item; every change to field data and accounts leaves one row. */
export interface AuditEntry {
  userId: string | null;
  action: string;
  targetType: "site" | "campaign" | "upload" | "exclusion" | "member" | "user";
  targetId: string | number;
  details?: Record<string, unknown>;
}

export async function recordAudit(knex: Knex, entry: AuditEntry): Promise<void> {
  await knex("audit_log").insert({
    at: new Date().toISOString(),
    user_id: entry.userId,
    action: entry.action,
    target_type: entry.targetType,
    target_id: String(entry.targetId),
    details: JSON.stringify(entry.details ?? {}),
  });
}
