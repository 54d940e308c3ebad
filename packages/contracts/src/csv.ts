import Papa from "papaparse";

/** One cell of a downloaded CSV file. null and undefined are written as an empty (quoted) cell. */
export type CsvCell = string | number | boolean | null | undefined;

/**
 * First characters that make a spreadsheet read a cell as a formula or a command (=, +, -, @), or that some
 * spreadsheets strip before doing so (tab, carriage return). OWASP's "CSV Injection" guidance lists exactly these.
 * Tested on the cell's text, so numbers are treated like text: -0.5 is written '-0.5 (see spreadsheetSafeCsv).
 */
const FORMULA_START = /^[=+\-@\t\r]/;

/**
 * Rows as spreadsheet-safe CSV text: every cell quoted (a quote inside doubled, RFC 4180), and every cell whose
 * text begins with =, +, -, @, tab or CR prefixed with an apostrophe, so Excel, LibreOffice and Google Sheets show
 * it as text instead of running it. This includes negative numbers: a cell may hold a value from an uploaded file,
 * and "-1+cmd|…" must not be told apart from "-0.5" by its look. A reader that wants the number back strips one
 * leading apostrophe before a sign. Lines end in \n; the text ends with one.
 * Every CSV download of Calmcrest is written with this function.
 */
export function spreadsheetSafeCsv(rows: readonly (readonly CsvCell[])[]): string {
  if (rows.length === 0) return "";
  const asText = rows.map((row) => row.map((cell) => (cell === null || cell === undefined ? "" : String(cell))));
  return `${Papa.unparse(asText, { quotes: true, quoteChar: '"', escapeChar: '"', escapeFormulae: FORMULA_START, newline: "\n", header: false })}\n`;
}
