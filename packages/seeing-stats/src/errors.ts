/**
 * The package's one failure contract: a bad argument throws SeeingInputError, a log file that cannot be
 * read as a whole throws LogFormatError. Messages name the argument and the unit expected, e.g.
 * "wavelengthNm must be a positive number of nanometres, got -500".
 */
export class SeeingInputError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'SeeingInputError';
  }
}

/** A whole file is unusable. `line` is 1-based (null when no line is to blame); `hint` says how to fix it. */
export class LogFormatError extends Error {
  readonly line: number | null;
  readonly hint: string;
  constructor(message: string, options: { line?: number | null; hint: string }) {
    super(message);
    this.name = 'LogFormatError';
    this.line = options.line ?? null;
    this.hint = options.hint;
  }
}

/** Throws SeeingInputError unless value is a finite number > 0. */
export function requirePositive(value: number, name: string, unitWords: string): void {
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0) {
    throw new SeeingInputError(`${name} must be a positive number of ${unitWords}, got ${String(value)}`);
  }
}

/** Throws SeeingInputError unless value is finite and in [low, high) (or [low, high] when highInclusive). */
export function requireRange(value: number, name: string, low: number, high: number, unitWords: string, highInclusive = false): void {
  const ok = typeof value === 'number' && Number.isFinite(value) && value >= low && (highInclusive ? value <= high : value < high);
  if (!ok) {
    const bracket = highInclusive ? ']' : ')';
    throw new SeeingInputError(`${name} must be ${unitWords} in [${low}, ${high}${bracket}, got ${String(value)}`);
  }
}
