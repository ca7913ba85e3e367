/**
 * Reading readings from a CSV file: Blindcut's own layout, or any instrument's export
 * through a column mapping. Pure: parses and checks rows; the server decides whether
 * they fit the run (duplicates, the stop rule) and commits all or none.
 *
 * Blindcut's layout (header row required, columns in any order):
 *   cut,position,kind,value_gf
 *   0,heel,check,182
 *   0,middle,check,175
 *   4,middle,confirmation,402
 * `kind` may be left out (every row a check). Card-depth runs use
 *   stroke,depth_mm
 */
import Papa from "papaparse";
import { FORCE_UNITS, roundReading, toGramsForce, type ForceUnit } from "./units.ts";

export type CsvMapping = {
  cut: string;
  position: string | null;
  value: string;
  kind: string | null;
  unit: ForceUnit | "mm";
};

export type CsvRow = { row: number; cut: number; position: string; kind: "check" | "confirmation"; value: number };
export type CsvRowError = { row: number; column: string; message: string };
export type CsvParse = { headers: string[]; rows: CsvRow[]; errors: CsvRowError[] };

export const BLINDCUT_FORCE_LAYOUT: CsvMapping = { cut: "cut", position: "position", kind: "kind", value: "value_gf", unit: "gf" };
export const BLINDCUT_CARD_LAYOUT: CsvMapping = { cut: "stroke", position: null, kind: null, value: "depth_mm", unit: "mm" };
export const MAX_CSV_ROWS = 5000;
/** No reading of either kind comes near this (gf or mm); the instrument's own range is checked later. */
export const MAX_CSV_VALUE = 100_000;

const clean = (h: string) => h.replace(/^\uFEFF/, "").trim().toLowerCase();

/** The header row of a CSV text, cleaned as the mapping compares it. */
export function csvHeaders(text: string): string[] {
  const parsed = Papa.parse<string[]>(text.replace(/^\uFEFF/, ""), { preview: 1, skipEmptyLines: "greedy" });
  return (parsed.data[0] ?? []).map(clean);
}

/** A decimal as instruments write it: "182", "182.5" or "182,5" (a decimal comma). */
function parseDecimal(raw: string): number | null {
  const t = raw.trim().replace(/\s/g, "");
  if (!/^[-+]?\d+([.,]\d+)?$/.test(t)) return null;
  return Number(t.replace(",", "."));
}

/**
 * Parses a CSV text with a mapping: every row's cut (whole number, 0 or more), position
 * (the fixed `defaultPosition` when the mapping has no position column), kind (check or
 * confirmation; "check" without a kind column) and value (converted to gf, or mm for card).
 * Rows with an error are listed and left out; the caller commits nothing while any error stands.
 */
export function parseReadingsCsv(text: string, mapping: CsvMapping, defaultPosition: string | null = null): CsvParse {
  const parsed = Papa.parse<Record<string, string>>(text.replace(/^\uFEFF/, ""), { header: true, skipEmptyLines: "greedy", transformHeader: clean });
  const headers = parsed.meta.fields ?? [];
  const errors: CsvRowError[] = [];
  const need: [string, string | null][] = [
    ["cut", mapping.cut],
    ["value", mapping.value],
    ["position", mapping.position],
    ["kind", mapping.kind],
  ];
  for (const [what, column] of need) {
    if (column === null) continue;
    if (!headers.includes(clean(column))) errors.push({ row: 1, column, message: `The header row has no "${column}" column (for the ${what})` });
  }
  if (mapping.position === null && !defaultPosition) errors.push({ row: 1, column: "", message: "Choose the column that holds the position along the edge" });
  if (!(FORCE_UNITS as readonly string[]).includes(mapping.unit) && mapping.unit !== "mm") errors.push({ row: 1, column: "", message: "Choose the unit: gf or N" });
  for (const e of parsed.errors.slice(0, 20)) errors.push({ row: (e.row ?? 0) + 2, column: "", message: e.message });
  if (parsed.data.length > MAX_CSV_ROWS) errors.push({ row: MAX_CSV_ROWS + 2, column: "", message: `At most ${MAX_CSV_ROWS} rows per import` });
  if (errors.length) return { headers, rows: [], errors };

  const rows: CsvRow[] = [];
  parsed.data.forEach((record, i) => {
    const row = i + 2; // the header is row 1
    const rowErrors: CsvRowError[] = [];
    const cutRaw = (record[clean(mapping.cut)] ?? "").trim();
    const cut = /^\d+$/.test(cutRaw) ? Number(cutRaw) : NaN;
    if (!Number.isSafeInteger(cut)) rowErrors.push({ row, column: mapping.cut, message: `"${cutRaw}" is not a whole number of cuts (0 = baseline)` });
    const position = mapping.position === null ? defaultPosition! : (record[clean(mapping.position)] ?? "").trim();
    if (!position) rowErrors.push({ row, column: mapping.position ?? "", message: "The position is empty" });
    let kind: "check" | "confirmation" = "check";
    if (mapping.kind !== null) {
      const k = (record[clean(mapping.kind)] ?? "").trim().toLowerCase();
      if (k === "" || k === "check") kind = "check";
      else if (k === "confirmation" || k === "confirm") kind = "confirmation";
      else rowErrors.push({ row, column: mapping.kind, message: `"${k}" is not a kind: write check or confirmation` });
    }
    const valueRaw = record[clean(mapping.value)] ?? "";
    const parsedValue = parseDecimal(valueRaw);
    let value = NaN;
    const shown = valueRaw.trim().length > 24 ? `${valueRaw.trim().slice(0, 20)}…` : valueRaw.trim();
    if (parsedValue === null) rowErrors.push({ row, column: mapping.value, message: `"${shown}" is not a number` });
    else if (parsedValue < 0) rowErrors.push({ row, column: mapping.value, message: "A reading cannot be negative" });
    else {
      // Hundreds of digits parse to Infinity or to a value no instrument reads: refused here,
      // and every value is range-checked against the instrument when the rows meet the run.
      value = !Number.isFinite(parsedValue) ? NaN : mapping.unit === "mm" ? parsedValue : roundReading(toGramsForce(parsedValue, mapping.unit));
      if (!Number.isFinite(value) || value > MAX_CSV_VALUE) {
        rowErrors.push({ row, column: mapping.value, message: `"${shown}" is beyond any instrument's range` });
        value = NaN;
      }
    }
    if (rowErrors.length) errors.push(...rowErrors);
    else rows.push({ row, cut, position, kind, value });
  });
  if (!rows.length && !errors.length) errors.push({ row: 2, column: "", message: "The file has a header row but no readings" });
  return { headers, rows, errors };
}
