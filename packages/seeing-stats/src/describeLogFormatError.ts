import type { LogFormatError } from './errors.js';

export interface LogFormatDescription {
  /** What is wrong and where: the message, with the line when one is to blame. */
  problem: string;
  /** How to fix it. */
  hint: string;
  /** Both in one sentence pair, for an API error or an upload's stored error. */
  text: string;
}

/**
 * The one way a LogFormatError is told to a person (the upload route, the ingest worker and the analyzer all use
 * it). Example: a binary file at line 3 → { problem: "The file is not a text log: … (line 3)", hint: "…", text: "… (line 3). …" }.
 */
export function describeLogFormatError(error: LogFormatError): LogFormatDescription {
  const problem = `${error.message}${error.line === null ? '' : ` (line ${error.line})`}`;
  return { problem, hint: error.hint, text: `${problem}. ${error.hint}`.trim() };
}
