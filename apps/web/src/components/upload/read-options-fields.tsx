import { delimiterName, TIME_FORMATS, type DelimiterChoice, type TimeFormat } from "@calmcrest/seeing-stats";
import type { LogHead } from "../../lib/log-head";
import type { ReadOptionsState } from "../../upload/useReadOptions";

/** The time formats in words, for the wizard's choice. */
const TIME_FORMAT_WORDS: Record<TimeFormat, string> = {
  iso: "ISO 8601 dates and times (2025-03-01 23:15:00)",
  jd: "Julian dates (2460736.46875)",
  mjd: "modified Julian dates (60735.96875)",
  dmy: "day first (01/03/2025 23:15)",
  mdy: "month first (03/01/2025 23:15)",
};

/** The delimiters a person can name, in words. */
const DELIMITER_WORDS: [DelimiterChoice, string][] = [
  [",", "comma ,"],
  [";", "semicolon ;"],
  ["tab", "tab"],
  ["space", "single space (two spaces make an empty column)"],
  ["whitespace", "runs of spaces or tabs (aligned columns)"],
];

/** Where the columns are: the delimiter (detected unless chosen) and the line of the column names, with the preamble named. */
export function LayoutFields({ options, head, disabled }: { options: ReadOptionsState; head: LogHead | null; disabled: boolean }) {
  return (
    <fieldset className="mt-4 flex min-w-0 flex-wrap items-end gap-4 rounded-lg border border-line bg-paper p-3 text-sm">
      <legend className="px-1 font-semibold">Where the columns are</legend>
      <label className="block min-w-0 max-w-full">
        <span className="block font-semibold">Columns separated by</span>
        <select
          value={options.delimiterChoice}
          disabled={disabled}
          onChange={(event) => options.setDelimiterChoice(event.target.value as DelimiterChoice | "")}
          className="mt-1 w-full max-w-full rounded-md border border-line bg-panel px-2 py-1"
        >
          <option value="">{head && options.delimiterChoice === "" ? `Detect (found: ${delimiterName(head.delimiter)})` : "Detect"}</option>
          {DELIMITER_WORDS.map(([value, words]) => (
            <option key={value} value={value}>
              {words}
            </option>
          ))}
        </select>
      </label>
      <label className="block">
        <span className="block font-semibold">
          Column names on line <span className="font-normal text-ink-soft">(empty: the first line that is not a # comment)</span>
        </span>
        <input
          value={options.headerLineText}
          disabled={disabled}
          inputMode="numeric"
          onChange={(event) => options.setHeaderLineText(event.target.value)}
          placeholder="1"
          className="mt-1 w-24 rounded-md border border-line bg-panel px-2 py-1"
          aria-invalid={options.headerLineProblem ? true : undefined}
        />
      </label>
      {options.headerLineProblem ? (
        <p role="alert" className="w-full text-bad">
          {options.headerLineProblem}
        </p>
      ) : head && head.preambleLines > 0 ? (
        <p className="w-full text-ink-soft" data-testid="preamble-note">
          {head.preambleLines === 1 ? "Line 1 stands" : `Lines 1–${head.preambleLines} stand`} above the column names: skipped as a preamble, never read as rows.
        </p>
      ) : null}
    </fieldset>
  );
}

/** How the times are written: the format of the time column and the zone of times written without one. */
export function TimeFields({ options }: { options: ReadOptionsState }) {
  return (
    <fieldset className="mt-4 flex min-w-0 flex-wrap items-end gap-4 rounded-lg border border-line bg-paper p-3 text-sm">
      <legend className="px-1 font-semibold">How the times are written</legend>
      <label className="block min-w-0 max-w-full">
        <span className="block font-semibold">Time column holds</span>
        <select value={options.timeFormat} onChange={(event) => options.setTimeFormat(event.target.value as TimeFormat)} className="mt-1 w-full max-w-full rounded-md border border-line bg-panel px-2 py-1">
          {TIME_FORMATS.map((format) => (
            <option key={format} value={format}>
              {TIME_FORMAT_WORDS[format]}
            </option>
          ))}
        </select>
      </label>
      <label className="block">
        <span className="block font-semibold">
          Time zone of times written without one <span className="font-normal text-ink-soft">(±HH:MM; empty: UTC)</span>
        </span>
        <input value={options.utcOffsetText} onChange={(event) => options.setUtcOffsetText(event.target.value)} placeholder="+00:00" className="mt-1 w-28 rounded-md border border-line bg-panel px-2 py-1" aria-invalid={options.offsetProblem ? true : undefined} />
      </label>
      {options.offsetProblem ? (
        <p role="alert" className="w-full text-bad">
          {options.offsetProblem}
        </p>
      ) : null}
    </fieldset>
  );
}
