import Papa from "papaparse";

/**
 * A text cell a spreadsheet would run as a formula: it begins, after any leading
 * whitespace, with =, +, -, @, tab or carriage return, whatever follows (line breaks
 * included, so no `.` or `$` here).
 */
export const FORMULA_START = /^[\s]*[=+\-@\t\r]/;

export type CsvCell = string | number | boolean | null | undefined;

/**
 * The one CSV writer of the app: RFC 4180 quoting, CRLF line ends, and every text cell
 * that starts like a formula is prefixed with an apostrophe and quoted. Numbers are data
 * (a negative reading stays a number); text that only looks like a number is still text.
 */
export function toCsv(fields: readonly string[], rows: readonly (readonly CsvCell[])[]): string {
  const data = rows.map((row) => row.map((cell) => (cell === null || cell === undefined ? "" : cell)));
  return `${Papa.unparse({ fields: [...fields], data }, { escapeFormulae: FORMULA_START, newline: "\r\n" })}\r\n`;
}
