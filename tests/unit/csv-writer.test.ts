import { describe, expect, it } from "vitest";
import Papa from "papaparse";
import { readFileSync, readdirSync, statSync } from "node:fs";
import path from "node:path";
import { toCsv } from "~/lib/csv.ts";
import { bladesToCsv } from "~/server/library.server.ts";

const parse = (csv: string) => Papa.parse<string[]>(csv, { skipEmptyLines: true }).data;

describe("15.6 CSV formula escaping (one shared writer)", () => {
  const hostile = ['=HYPERLINK("http://evil.example","x")\nsecond line', "+1\r\n2", "-2+3\n", "@SUM(A1)\nx", "\t=1\n", "\r=1", "  =HYPERLINK(1)\nx", "\n=1"];

  it("15.6 every text cell that starts like a formula, multi-line or not, is prefixed and quoted", () => {
    const rows = parse(toCsv(["value"], hostile.map((v) => [v])));
    expect(rows.slice(1).map((r) => r[0])).toEqual(hostile.map((v) => `'${v}`));
  });

  it("15.6 plain text and numbers stay as they are, quotes and line breaks are quoted", () => {
    const csv = toCsv(["a", "b", "c", "d"], [["plain", -3.5, 'say "hi"', "two\nlines"], [null, undefined, 0, "a=b"]]);
    expect(parse(csv)).toEqual([["a", "b", "c", "d"], ["plain", "-3.5", 'say "hi"', "two\nlines"], ["", "", "0", "a=b"]]);
    expect(csv.endsWith("\r\n")).toBe(true);
  });

  it("15.6 blades/export.csv escapes a multi-line heat treatment", () => {
    const blade = { inventoryNumber: "INV-1", heatTreatment: '=HYPERLINK("http://evil.example")\nquench', steel: "AISI 1095" } as unknown as Parameters<typeof bladesToCsv>[0][number];
    const csv = bladesToCsv([blade]);
    expect(csv).not.toMatch(/(^|,)=HYPERLINK/m);
    expect(csv).toContain(`"'=HYPERLINK(""http://evil.example"")\nquench"`);
  });

  it("15.6 readings.csv, outcomes.csv, schedule CSV and blade export all write through the shared writer", () => {
    const root = path.resolve(import.meta.dirname, "../../app");
    const files: string[] = [];
    const walk = (dir: string) => {
      for (const name of readdirSync(dir)) {
        const full = path.join(dir, name);
        if (statSync(full).isDirectory()) walk(full);
        else if (/\.tsx?$/.test(name)) files.push(full);
      }
    };
    walk(root);
    const writers = files.filter((f) => /Papa\.unparse|\.join\(","\)\s*\)?\s*;?\s*$/m.test(readFileSync(f, "utf8")) && !f.endsWith(path.join("lib", "csv.ts")));
    expect(writers.filter((f) => readFileSync(f, "utf8").includes("unparse"))).toEqual([]);
    for (const module of ["server/analysis/exports.server.ts", "server/studies/schedule.server.ts", "server/library.server.ts"]) {
      expect(readFileSync(path.join(root, module), "utf8"), module).toContain("toCsv(");
    }
  });
});
