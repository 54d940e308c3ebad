/**
 * Who may write to SQLite now: main-thread writers or the ingest worker, never both (see
 * docs/decisions/0006-write-slot.md). better-sqlite3 is synchronous, so a main-thread write that met the
 * ingest's write lock would wait inside SQLite's busy handler and freeze the whole event loop (progress polls
 * included) until the ingest commits. Main-thread writers therefore wait here, asynchronously, while an ingest
 * holds the gate; the next ingest starts only once the main-thread writes in progress are done.
 */
export class WriteGate {
  private ingestHolds = false;
  private writers = 0;
  private writerWaiters: (() => void)[] = [];
  private readonly freeListeners: (() => void)[] = [];
  private noWriterWaiters: (() => void)[] = [];
  private exclusiveWaiters: (() => void)[] = [];

  /** Waits until no ingest holds the gate and takes a writer's slot. Call the returned release exactly once (more calls are ignored). */
  async acquire(): Promise<() => void> {
    while (this.ingestHolds) await new Promise<void>((resolve) => this.writerWaiters.push(resolve));
    this.writers += 1;
    let released = false;
    return () => {
      if (released) return;
      released = true;
      this.writers -= 1;
      if (this.writers === 0) {
        for (const resolve of this.noWriterWaiters.splice(0)) resolve();
        for (const listener of this.freeListeners) listener();
      }
    };
  }

  /** Runs `write` holding a writer's slot. */
  async withSlot<T>(write: () => Promise<T>): Promise<T> {
    const release = await this.acquire();
    try {
      return await write();
    } finally {
      release();
    }
  }

  /** Whether a main-thread writer holds a slot (an ingest must not start). */
  get writersActive(): boolean {
    return this.writers > 0;
  }

  /** The ingest queue takes the gate before its worker opens the write transaction. Only call when !writersActive. */
  holdForIngest(): void {
    if (this.writers > 0) throw new Error("An ingest cannot take the write gate while main-thread writers hold it.");
    if (this.ingestHolds) throw new Error("The write gate is held for another connection's write already; wait with holdExclusive().");
    this.ingestHolds = true;
  }

  /** The ingest is over: writers that waited go first (their continuations run before any setImmediate), then the next exclusive holder. */
  releaseFromIngest(): void {
    this.ingestHolds = false;
    for (const resolve of this.writerWaiters.splice(0)) resolve();
    for (const resolve of this.exclusiveWaiters.splice(0)) resolve();
  }

  /**
   * Waits (asynchronously) until neither an ingest's commit nor another exclusive holder holds the gate and no
   * main-thread writer is mid-write, then holds it like an ingest's commit: for work another connection does under
   * SQLite's write lock (an ingest's commit, a sample move in the ingest worker). Call the returned release once.
   */
  async holdExclusive(): Promise<() => void> {
    for (;;) {
      if (this.ingestHolds) await new Promise<void>((resolve) => this.exclusiveWaiters.push(resolve));
      else if (this.writers > 0) await this.noWriters();
      else break;
    }
    this.holdForIngest();
    let released = false;
    return () => {
      if (released) return;
      released = true;
      this.releaseFromIngest();
    };
  }

  /** Resolves once no main-thread writer holds a slot (at once if none does). */
  async noWriters(): Promise<void> {
    while (this.writers > 0) await new Promise<void>((resolve) => this.noWriterWaiters.push(resolve));
  }

  /** Called every time the last main-thread writer releases its slot (the ingest queue starts the next ingest). */
  onFree(listener: () => void): void {
    this.freeListeners.push(listener);
  }
}
