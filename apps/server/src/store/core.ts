import type { Knex } from "knex";
import { isAuditAction, type AuditEntry as ContractAuditEntry } from "@calmcrest/contracts";
import type { AppDatabase } from "../db/database.server";
import type { SampleCache } from "../summaries/sample-cache.server";
import { RequestReads } from "./request-reads";
import type { SampleMoveJob, SampleMoveOutcome } from "./sample-moves";
import type { WriteGate } from "./write-gate";

/**
 * Who did what to which item; every change to field data and accounts leaves one audit row. The action is one of
 * the contracts' fixed vocabulary (AUDIT_ACTIONS) and its details have the type that action declares.
 */
export type AuditEntry = ContractAuditEntry;

/** A change as listeners see it: the audit entry and when it was written. */
export type Change = AuditEntry & { at: string };

/**
 * The seam for modules that must react to every change (a report's outbox, comments, a summary cache):
 * `inTransaction` runs inside the write's transaction, right after its audit row, so its own rows commit or roll
 * back with the change; `afterCommit` runs only once the change is committed (cache invalidation, waking a sender).
 */
export interface ChangeListener {
  name: string;
  inTransaction?(change: Change, trx: Knex.Transaction): Promise<void> | void;
  afterCommit?(change: Change): void;
}

/** What a write function gets: the transaction, the audit row writer and the after-commit queue. */
export interface WriteScope {
  /** Every query of the write goes through this transaction (the pool has one connection: never use the plain knex inside). */
  trx: Knex.Transaction;
  /** Writes the audit row of the change in this transaction and runs the listeners' in-transaction hooks. */
  audit(entry: AuditEntry): Promise<void>;
  /** Runs `effect` after the transaction commits (e.g. clearing the sample cache); dropped when it rolls back. */
  afterCommit(effect: () => void): void;
}

export interface WriteOptions {
  /**
   * false only for the ingest queue's own status writes: it holds the write gate itself while they run, so
   * waiting for the gate would wait for itself.
   */
  gated?: boolean;
  /** false for bookkeeping that is not a person's change (an ingest's status); every other write must audit. */
  audited?: boolean;
}

/** Runs a sample move (store/sample-moves.ts) off the main thread: the ingest queue, in its worker. */
export interface SampleMover {
  moveSamples(job: SampleMoveJob): Promise<SampleMoveOutcome>;
}

/** The database, the caches its writes invalidate, the write gate and the change listeners: shared by every store module. */
export class StoreCore {
  private readonly listeners: ChangeListener[] = [];
  private sampleMover: SampleMover | null = null;
  /** Prepared reads for the site and campaign look-ups of every request (never inside a write). */
  readonly reads: RequestReads;

  constructor(
    readonly db: AppDatabase,
    readonly samples: SampleCache,
    readonly gate: WriteGate,
    /** The address links in e-mails point to (env.publicBaseUrl), without a trailing slash. */
    readonly publicBaseUrl: string = "http://localhost:4173",
  ) {
    this.reads = new RequestReads(db.sqlite);
  }

  /** The connection for reads (never inside a write: use the scope's trx there). */
  get knex(): Knex {
    return this.db.knex;
  }

  /** Registers a listener for every later change; returns a function that removes it. */
  onChange(listener: ChangeListener): () => void {
    this.listeners.push(listener);
    return () => {
      const index = this.listeners.indexOf(listener);
      if (index >= 0) this.listeners.splice(index, 1);
    };
  }

  /**
   * Runs `fn` in one transaction, waiting first (asynchronously) for the write gate. The audit rows `fn` writes
   * commit or roll back with its change; after-commit effects and listeners run only after COMMIT. A write that
   * records no audit row is a bug and rolls back (unless `audited: false`).
   */
  async write<T>(fn: (scope: WriteScope) => Promise<T>, options: WriteOptions = {}): Promise<T> {
    const run = async (): Promise<T> => {
      const changes: Change[] = [];
      const effects: (() => void)[] = [];
      const result = await this.db.knex.transaction(async (trx) => {
        const scope: WriteScope = {
          trx,
          audit: async (entry) => {
            if (!isAuditAction(entry.action)) throw new Error(`Unknown audit action ${String(entry.action)}: add it to the vocabulary in packages/contracts/src/audit.ts.`);
            const change: Change = { ...entry, at: new Date().toISOString() };
            await trx("audit_log").insert({
              at: change.at,
              user_id: change.userId,
              action: change.action,
              target_type: change.targetType,
              target_id: String(change.targetId),
              details: JSON.stringify(change.details),
            });
            changes.push(change);
            for (const listener of this.listeners) await listener.inTransaction?.(change, trx);
          },
          afterCommit: (effect) => {
            effects.push(effect);
          },
        };
        const value = await fn(scope);
        if (options.audited !== false && changes.length === 0) {
          throw new Error("A store write recorded no audit row; every change writes one (scope.audit).");
        }
        return value;
      });
      for (const effect of effects) effect();
      for (const change of changes) for (const listener of this.listeners) listener.afterCommit?.(change);
      return result;
    };
    return options.gated === false ? run() : this.gate.withSlot(run);
  }

  /** The ingest queue registers itself: it runs sample moves in its worker, holding the write gate. */
  useSampleMover(mover: SampleMover): void {
    this.sampleMover = mover;
  }

  /**
   * Withdraws, restores or re-reads an upload's samples in one transaction on the ingest worker's connection (a
   * million samples take seconds to move, which must not stall the event loop), then runs the after-commit
   * effects and the listeners' after-commit hooks here. The move writes its audit rows and raises the campaign's
   * data version itself, in its transaction (listeners' in-transaction hooks do not run for it).
   */
  async moveSamples(job: SampleMoveJob): Promise<SampleMoveOutcome> {
    if (!this.sampleMover) throw new Error("Sample moves run in the ingest worker: create the IngestQueue with this store first.");
    const outcome = await this.sampleMover.moveSamples(job);
    if (outcome.ok) {
      let invalidated = false;
      const invalidate = () => {
        if (invalidated) return;
        invalidated = true;
        this.samples.invalidate(job.campaignId);
      };
      for (const change of outcome.changes) this.committedElsewhere(change, invalidate);
    }
    return outcome;
  }

  /**
   * For a change committed elsewhere (the ingest worker's own transaction): runs the after-commit effect and the
   * listeners' after-commit hooks, so they hear about it like any other change. No audit row is written.
   */
  committedElsewhere(change: Change, effect: () => void): void {
    effect();
    for (const listener of this.listeners) listener.afterCommit?.(change);
  }
}
