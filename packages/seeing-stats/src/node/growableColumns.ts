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
  length = 0;

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
  }
}
