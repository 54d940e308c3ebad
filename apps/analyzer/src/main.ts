#!/usr/bin/env node
// Calmcrest's command-line log check: field engineers run it before uploading, with the same engine the server uses.
import { basename } from 'node:path';
import { setFlagsFromString } from 'node:v8';
import { describeLogFormatError, LogFormatError, predictTelescopeFwhm, READING_WARNING_CODES, SeeingInputError, type TelescopePrediction } from '@calmcrest/seeing-stats';
import { analyzeLog } from '@calmcrest/seeing-stats/node';
import { formatReport } from './formatReport.ts';
import { parseArguments, USAGE, UsageError } from './parseArguments.ts';

// The young generation stays at its first size instead of doubling up to 16 MB a half: the reader leaves little
// short-lived garbage, so a small one costs a few more, quick collections and keeps about 15 MB of peak memory off a
// million-row run (issue 15; the flag is read whenever the young generation would grow, so it applies from here on).
setFlagsFromString('--semi-space-growth-factor=1');

const EXIT_NO_SAMPLES = 1;
const EXIT_UNUSABLE = 2;
/** Analysed, but the file lost lines or many rows (readingWarnings): the statistics may not stand for the log. */
const EXIT_WARNINGS = 3;

async function main(argv: readonly string[]): Promise<number> {
  let parsed;
  try {
    parsed = parseArguments(argv);
  } catch (error) {
    if (error instanceof UsageError) return fail(error.message, 'Run with --help for the flags.');
    throw error;
  }
  if (parsed.help) {
    process.stdout.write(`${USAGE}\n`);
    return 0;
  }
  if (parsed.file === null) return fail('No log file given.', 'Usage: npm run --silent analyze -- <file> [flags]; --help lists the flags.');
  try {
    const report = await analyzeLog(parsed.file, parsed.options);
    const telescope: TelescopePrediction | null =
      parsed.telescope !== null && report.samples.accepted > 0 ? predictTelescopeFwhm(report.seeing, parsed.telescope) : null;
    if (parsed.json) process.stdout.write(`${JSON.stringify(telescope === null ? report : { ...report, telescope })}\n`);
    else process.stdout.write(formatReport(report, basename(parsed.file), telescope));
    // Warnings about the file itself are in the report (JSON "warnings"); stderr repeats them so a script's log
    // shows them too, and they set the exit code: the statistics may not stand for the log.
    const fileWarnings = report.warnings.filter((warning) => (READING_WARNING_CODES as readonly string[]).includes(warning.code));
    for (const warning of fileWarnings) process.stderr.write(`calmcrest analyze: warning (${warning.code}): ${warning.message}\n`);
    if (report.samples.accepted === 0) {
      if (parsed.json) process.stderr.write('No sample was accepted; see rejectedByReason and rejectedRows.\n');
      return EXIT_NO_SAMPLES;
    }
    return fileWarnings.length > 0 ? EXIT_WARNINGS : 0;
  } catch (error) {
    if (error instanceof LogFormatError) {
      const { problem, hint } = describeLogFormatError(error);
      return fail(`${parsed.file}: ${problem}`, hint);
    }
    if (error instanceof SeeingInputError) return fail(error.message, 'Check the flag values; --help lists them with their units.');
    throw error;
  }
}

function fail(message: string, hint: string): number {
  process.stderr.write(`calmcrest analyze: ${message}\n  How to fix: ${hint}\n`);
  return EXIT_UNUSABLE;
}

// A reader that stops early (`… | head`) closes the pipe: that is not an error worth a stack trace.
process.stdout.on('error', (error: NodeJS.ErrnoException) => {
  if (error.code === 'EPIPE') process.exit(process.exitCode ?? 0);
  throw error;
});

main(process.argv.slice(2)).then(
  (code) => {
    process.exitCode = code;
  },
  (error: unknown) => {
    // An unexpected failure is a bug in Calmcrest, not in the file: say so, keep stdout clean.
    process.stderr.write(`calmcrest analyze: internal error: ${error instanceof Error ? (error.stack ?? error.message) : String(error)}\n`);
    process.exitCode = EXIT_UNUSABLE;
  },
);
