import Database from "better-sqlite3";
import type { Adapter, DatabaseSession, DatabaseUser, RegisteredDatabaseUserAttributes } from "lucia";
import { reusePreparedStatements } from "../db/database.server";
import { tune } from "../db/tune.server";

/** How long a session write waits for SQLite's write lock on the main thread before it is deferred instead. */
export const SESSION_WRITE_WAIT_MS = 0;
/** Retry delays of a deferred session write whose write slot met the lock anyway (another connection's write). */
const RETRY_FIRST_MS = 10;
const RETRY_MAX_MS = 500;

type SessionOp =
  | { kind: "set"; session: DatabaseSession }
  | { kind: "expire"; sessionId: string; expiresAt: Date }
  | { kind: "delete"; sessionId: string }
  | { kind: "deleteUser"; userId: string }
  | { kind: "deleteExpired"; nowMs: number };

interface SessionRow {
  id: string;
  user_id: string;
  expires_at: number;
}

/** Runs a write when no ingest holds SQLite's write lock (IngestQueue.withWriteSlot). */
export type WriteScheduler = (write: () => Promise<void>) => Promise<void>;

function isBusy(error: unknown): boolean {
  if (typeof error !== "object" || error === null || !("code" in error)) return false;
  const code = String(error.code);
  return code.startsWith("SQLITE_BUSY") || code.startsWith("SQLITE_LOCKED");
}

const toSession = (row: SessionRow): DatabaseSession => ({ id: row.id, userId: row.user_id, expiresAt: new Date(row.expires_at * 1000), attributes: {} });
const unixSeconds = (date: Date) => Math.floor(date.getTime() / 1000);

/**
 * Lucia's storage for sessions, on its own connection, that never makes the main thread wait for SQLite's write
 * lock. Reads use WAL snapshots (never blocked by a writer). A write (sign-in, sign-out, the sliding refresh Lucia
 * does for a session past half its life, the removal of an expired one) is tried at once with no busy wait; when
 * an ingest (or any other writer) holds the lock, it is kept in memory, in order, and written through the
 * ingest queue's write slot as soon as the lock is free. Until then every read sees it, so the person using the
 * session notices nothing. A server killed before the write lands loses only that refresh or sign-in (the person
 * signs in again); it never loses or invents a sample.
 */
export class SessionAdapter implements Adapter {
  private readonly sqlite: Database.Database;
  private readonly pending: SessionOp[] = [];
  private flushing: Promise<void> | null = null;
  private settledWaiters: (() => void)[] = [];
  private closed = false;

  constructor(
    file: string,
    private readonly schedule: WriteScheduler,
  ) {
    this.sqlite = new Database(file);
    tune(this.sqlite);
    // Every request with a cookie reads its session and user: keep those statements prepared.
    reusePreparedStatements(this.sqlite);
    this.sqlite.pragma(`busy_timeout = ${SESSION_WRITE_WAIT_MS}`);
  }

  /** Session writes not yet in the database (they wait for the write lock). */
  pendingWrites(): number {
    return this.pending.length;
  }

  /** Resolves when every deferred session write has landed. */
  settled(): Promise<void> {
    if (this.pending.length === 0) return Promise.resolve();
    return new Promise((resolve) => this.settledWaiters.push(resolve));
  }

  async getSessionAndUser(sessionId: string): Promise<[DatabaseSession | null, DatabaseUser | null]> {
    if (this.pending.length === 0) {
      // The usual case, on every request with a cookie: session and user in one statement.
      const joined = this.sqlite
        .prepare("SELECT session.expires_at AS session_expires_at, user.* FROM session JOIN user ON user.id = session.user_id WHERE session.id = ?")
        .get(sessionId) as ({ session_expires_at: number; id: string } & RegisteredDatabaseUserAttributes) | undefined;
      if (joined) {
        const { session_expires_at: expiresAt, id, ...attributes } = joined;
        return [toSession({ id: sessionId, user_id: id, expires_at: expiresAt }), { id, attributes }];
      }
      // No such session (or, never expected, one without its user): the step-by-step reads below say which.
    }
    const row = this.sqlite.prepare("SELECT id, user_id, expires_at FROM session WHERE id = ?").get(sessionId) as SessionRow | undefined;
    const session = this.replay(sessionId, row ? toSession(row) : null);
    if (!session) return [null, null];
    return [session, this.user(session.userId)];
  }

  async getUserSessions(userId: string): Promise<DatabaseSession[]> {
    const rows = this.sqlite.prepare("SELECT id, user_id, expires_at FROM session WHERE user_id = ?").all(userId) as SessionRow[];
    const byId = new Map<string, DatabaseSession | null>(rows.map((row) => [row.id, toSession(row)]));
    for (const op of this.pending) if (op.kind === "set" && op.session.userId === userId && !byId.has(op.session.id)) byId.set(op.session.id, null);
    const sessions: DatabaseSession[] = [];
    for (const [id, stored] of byId) {
      const session = this.replay(id, stored);
      if (session && session.userId === userId) sessions.push(session);
    }
    return sessions;
  }

  setSession(session: DatabaseSession): Promise<void> {
    return this.write({ kind: "set", session });
  }

  updateSessionExpiration(sessionId: string, expiresAt: Date): Promise<void> {
    return this.write({ kind: "expire", sessionId, expiresAt });
  }

  deleteSession(sessionId: string): Promise<void> {
    return this.write({ kind: "delete", sessionId });
  }

  deleteUserSessions(userId: string): Promise<void> {
    return this.write({ kind: "deleteUser", userId });
  }

  deleteExpiredSessions(): Promise<void> {
    return this.write({ kind: "deleteExpired", nowMs: Date.now() });
  }

  /** Writes what is still pending (waiting up to `waitMs` for the lock), then closes the connection. */
  close(waitMs = 2000): void {
    if (this.closed) return;
    this.closed = true;
    if (this.pending.length > 0) {
      this.sqlite.pragma(`busy_timeout = ${waitMs}`);
      try {
        this.applyPending();
      } catch (error) {
        console.error(`Calmcrest: ${this.pending.length} session change(s) could not be saved at shutdown (${String(error)}); those people sign in again.`);
      }
    }
    this.sqlite.close();
  }

  /** The stored session `sessionId` after the pending writes, in order. */
  private replay(sessionId: string, stored: DatabaseSession | null): DatabaseSession | null {
    let session = stored;
    for (const op of this.pending) {
      if (op.kind === "set" && op.session.id === sessionId) session = { ...op.session };
      else if (op.kind === "expire" && op.sessionId === sessionId && session) session = { ...session, expiresAt: op.expiresAt };
      else if (op.kind === "delete" && op.sessionId === sessionId) session = null;
      else if (op.kind === "deleteUser" && session?.userId === op.userId) session = null;
      else if (op.kind === "deleteExpired" && session && session.expiresAt.getTime() <= op.nowMs) session = null;
    }
    return session;
  }

  private user(userId: string): DatabaseUser | null {
    const row = this.sqlite.prepare("SELECT * FROM user WHERE id = ?").get(userId) as ({ id: string } & RegisteredDatabaseUserAttributes) | undefined;
    if (!row) return null;
    const { id, ...attributes } = row;
    return { id, attributes };
  }

  private apply(op: SessionOp): void {
    switch (op.kind) {
      case "set":
        this.sqlite.prepare("INSERT INTO session (id, user_id, expires_at) VALUES (?, ?, ?)").run(op.session.id, op.session.userId, unixSeconds(op.session.expiresAt));
        return;
      case "expire":
        this.sqlite.prepare("UPDATE session SET expires_at = ? WHERE id = ?").run(unixSeconds(op.expiresAt), op.sessionId);
        return;
      case "delete":
        this.sqlite.prepare("DELETE FROM session WHERE id = ?").run(op.sessionId);
        return;
      case "deleteUser":
        this.sqlite.prepare("DELETE FROM session WHERE user_id = ?").run(op.userId);
        return;
      case "deleteExpired":
        this.sqlite.prepare("DELETE FROM session WHERE expires_at <= ?").run(Math.floor(op.nowMs / 1000));
        return;
    }
  }

  /** Applies the pending writes in order, in one transaction; throws SQLITE_BUSY if the lock is taken. */
  private applyPending(): void {
    const ops = this.pending.slice();
    this.sqlite.transaction(() => {
      for (const op of ops) this.apply(op);
    })();
    this.pending.splice(0, ops.length);
  }

  private async write(op: SessionOp): Promise<void> {
    if (this.closed) throw new Error("The session store is closed.");
    if (this.pending.length === 0) {
      try {
        this.apply(op);
        return;
      } catch (error) {
        if (!isBusy(error)) throw error;
      }
    }
    // The lock is taken (or earlier writes still wait): keep the write, in order, and land it when the lock is free.
    this.pending.push(op);
    this.flushing ??= this.flush();
  }

  private async flush(): Promise<void> {
    let delayMs = RETRY_FIRST_MS;
    while (this.pending.length > 0 && !this.closed) {
      let landed = false;
      await this.schedule(async () => {
        if (this.closed) return;
        try {
          this.applyPending();
          landed = true;
        } catch (error) {
          if (!isBusy(error)) {
            console.error(`Calmcrest: a deferred session change failed and is dropped: ${String(error)}`);
            this.pending.length = 0;
            landed = true;
          }
        }
      });
      if (!landed) {
        // The write slot was free but another connection held the lock for a moment: try again shortly.
        await new Promise((resolve) => setTimeout(resolve, delayMs));
        delayMs = Math.min(RETRY_MAX_MS, delayMs * 2);
      }
    }
    this.flushing = null;
    for (const resolve of this.settledWaiters.splice(0)) resolve();
  }
}
