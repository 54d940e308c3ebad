/** Typed columns that grow by doubling, so memory follows the number of kept rows, never the raw text. */
export class GrowableColumns {
  timeMs = new Float64Array(1024);
  seeingArcsec = new Float64Array(1024);
  line = new Int32Array(1024);
  /** 0 = accepted so far; otherwise a code of FILTER_CODES. */
  status = new Uint8Array(1024);
  /** 1 when the sample's two axis estimates disagree beyond the set ratio. */
  anisotropic = new Uint8Array(1024);
  /** Exposure-time correction of the sample: one of EXPOSURE_CODES. */
  exposure = new Uint8Array(1024);
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

  push(timeMs: number, seeingArcsec: number, line: number, status: number, anisotropic: boolean, exposure: number): void {
    if (this.length === this.timeMs.length) this.grow();
    this.timeMs[this.length] = timeMs;
    this.seeingArcsec[this.length] = seeingArcsec;
    this.line[this.length] = line;
    this.status[this.length] = status;
    this.anisotropic[this.length] = anisotropic ? 1 : 0;
    this.exposure[this.length] = exposure;
    this.length += 1;
  }

  private grow(): void {
    const capacity = this.timeMs.length * 2;
    const timeMs = new Float64Array(capacity);
    timeMs.set(this.timeMs);
    this.timeMs = timeMs;
    const seeing = new Float64Array(capacity);
    seeing.set(this.seeingArcsec);
    this.seeingArcsec = seeing;
    const line = new Int32Array(capacity);
    line.set(this.line);
    this.line = line;
    const status = new Uint8Array(capacity);
    status.set(this.status);
    this.status = status;
    const anisotropic = new Uint8Array(capacity);
    anisotropic.set(this.anisotropic);
    this.anisotropic = anisotropic;
    const exposure = new Uint8Array(capacity);
    exposure.set(this.exposure);
    this.exposure = exposure;
    this.tau0Ms = this.tau0Ms === null ? null : grownWithNaN(this.tau0Ms, capacity);
    this.theta0Arcsec = this.theta0Arcsec === null ? null : grownWithNaN(this.theta0Arcsec, capacity);
  }
}

function grownWithNaN(column: Float64Array, capacity: number): Float64Array {
  const grown = new Float64Array(capacity).fill(Number.NaN);
  grown.set(column);
  return grown;
}
