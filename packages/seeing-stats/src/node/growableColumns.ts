/** A status code that marks a duplicate time (see analyzeLog); stored in three bits as STORED_DUPLICATE. */
const DUPLICATE_STATUS = 255;
const STORED_DUPLICATE = 7;
const STATUS_BITS = 7;
const ANISOTROPIC_BIT = 8;
const EXPOSURE_SHIFT = 4;

/**
 * Typed columns that grow by doubling (or by reserve()), so memory follows the number of kept rows, never the raw
 * text: time and seeing as doubles, τ0/θ0 when logged, one byte of flags a row (status, anisotropic, exposure
 * correction), and each row's line number kept as the few points where line − row index changes (rows come in
 * line order, so that difference only grows), not as a column.
 */
export class GrowableColumns {
  timeMs = new Float64Array(1024);
  seeingArcsec = new Float64Array(1024);
  /** Per row: bits 0–2 the status (0 = accepted so far, 1–4 a filter code, 7 a duplicate), bit 3 anisotropic, bits 4–5 the exposure code. */
  private flags = new Uint8Array(1024);
  /** Row indices from which line − index is lineOffsets[k]; ascending. */
  private lineStarts: number[] = [];
  private lineOffsets: number[] = [];
  /** τ0 (ms) and θ0 (arcsec) at zenith and 500 nm, NaN where not logged; allocated at the first value, so logs without them cost nothing. */
  tau0Ms: Float64Array | null = null;
  theta0Arcsec: Float64Array | null = null;
  length = 0;

  /** Sets the τ0 and θ0 of the sample pushed last (call right after push). */
  setTurbulence(tau0Ms: number | null, theta0Arcsec: number | null): void {
    const index = this.length - 1;
    if (tau0Ms !== null) {
      this.tau0Ms ??= new Float64Array(this.timeMs.length).fill(Number.NaN);
      this.tau0Ms[index] = tau0Ms;
    }
    if (theta0Arcsec !== null) {
      this.theta0Arcsec ??= new Float64Array(this.timeMs.length).fill(Number.NaN);
      this.theta0Arcsec[index] = theta0Arcsec;
    }
  }

  /** `status`: 0, a filter code 1–4, or 255 for a duplicate; `exposure`: 0–2. Rows must come in ascending line order. */
  push(timeMs: number, seeingArcsec: number, line: number, status: number, anisotropic: boolean, exposure: number): void {
    if (this.length === this.timeMs.length) this.grow();
    const index = this.length;
    this.timeMs[index] = timeMs;
    this.seeingArcsec[index] = seeingArcsec;
    const offset = line - index;
    if (this.lineOffsets[this.lineOffsets.length - 1] !== offset) {
      this.lineStarts.push(index);
      this.lineOffsets.push(offset);
    }
    this.flags[index] = (status === DUPLICATE_STATUS ? STORED_DUPLICATE : status) | (anisotropic ? ANISOTROPIC_BIT : 0) | (exposure << EXPOSURE_SHIFT);
    this.length = index + 1;
  }

  /** The row's status: 0, a filter code 1–4, or 255 for a duplicate. */
  statusAt(index: number): number {
    const status = (this.flags[index] ?? 0) & STATUS_BITS;
    return status === STORED_DUPLICATE ? DUPLICATE_STATUS : status;
  }

  setStatus(index: number, status: number): void {
    const flags = this.flags[index] ?? 0;
    this.flags[index] = (flags & ~STATUS_BITS) | (status === DUPLICATE_STATUS ? STORED_DUPLICATE : status);
  }

  anisotropicAt(index: number): number {
    return (this.flags[index] ?? 0) & ANISOTROPIC_BIT ? 1 : 0;
  }

  exposureAt(index: number): number {
    return (this.flags[index] ?? 0) >>> EXPOSURE_SHIFT;
  }

  /** The 1-based line the row came from. */
  lineAt(index: number): number {
    let low = 0;
    let high = this.lineStarts.length - 1;
    // The last start at or before index.
    while (low < high) {
      const middle = (low + high + 1) >>> 1;
      if ((this.lineStarts[middle] ?? 0) <= index) low = middle;
      else high = middle - 1;
    }
    return index + (this.lineOffsets[low] ?? 0);
  }

  /**
   * Makes room for at least `capacity` rows at once (a caller that can estimate the final count, e.g. from the file
   * size, saves the doubling's copies and its up to twice too large last step).
   */
  reserve(capacity: number): void {
    if (capacity > this.timeMs.length) this.grow(Math.ceil(capacity));
  }

  /** Drops the flags (every row reads as accepted, 0, from here on), for a caller done with them: their memory can go. */
  releaseFlags(): void {
    this.flags = new Uint8Array(0);
  }

  private grow(capacity = this.timeMs.length * 2): void {
    const timeMs = new Float64Array(capacity);
    timeMs.set(this.timeMs);
    this.timeMs = timeMs;
    const seeing = new Float64Array(capacity);
    seeing.set(this.seeingArcsec);
    this.seeingArcsec = seeing;
    const flags = new Uint8Array(capacity);
    flags.set(this.flags);
    this.flags = flags;
    this.tau0Ms = this.tau0Ms === null ? null : grownWithNaN(this.tau0Ms, capacity);
    this.theta0Arcsec = this.theta0Arcsec === null ? null : grownWithNaN(this.theta0Arcsec, capacity);
  }
}

function grownWithNaN(column: Float64Array, capacity: number): Float64Array {
  const grown = new Float64Array(capacity).fill(Number.NaN);
  grown.set(column);
  return grown;
}
