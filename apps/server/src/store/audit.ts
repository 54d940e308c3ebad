import type { StoreCore } from "./core";

// The audit log: written only through StoreCore.write (scope.audit), in the transaction of the change it records.

export interface AuditRow {
  id: number;
  at: string;
  userId: string | null;
  action: string;
  targetType: string;
  targetId: string;
  details: Record<string, unknown>;
}

interface AuditDbRow {
  id: number;
  at: string;
  user_id: string | null;
  action: string;
  target_type: string;
  target_id: string;
  details: string;
}

export function auditStore(core: StoreCore) {
  return {
    /** Audit rows, oldest first; optionally of one item only. */
    async list(filter: { targetType?: string; targetId?: string | number } = {}): Promise<AuditRow[]> {
      const query = core.knex("audit_log").orderBy("id").select<AuditDbRow[]>("*");
      if (filter.targetType !== undefined) void query.where({ target_type: filter.targetType });
      if (filter.targetId !== undefined) void query.where({ target_id: String(filter.targetId) });
      const rows = await query;
      return rows.map((row) => ({
        id: row.id,
        at: row.at,
        userId: row.user_id,
        action: row.action,
        targetType: row.target_type,
        targetId: row.target_id,
        details: JSON.parse(row.details) as Record<string, unknown>,
      }));
    },

    /** The actions recorded for an item (or every item of a type), oldest first. */
    async actions(targetType: string, targetId?: string | number): Promise<string[]> {
      const rows = await this.list(targetId === undefined ? { targetType } : { targetType, targetId });
      return rows.map((row) => row.action);
    },
  };
}

export type AuditStore = ReturnType<typeof auditStore>;
