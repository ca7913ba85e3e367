// `npm run reanalyze -- <bundle.json>`: recomputes every figure of a study from the
// bundle's raw data with the project's statistics core, compares with the analysis
// recorded in it, prints the differences, and exits 0 only when every figure matches.
import { readFileSync } from "node:fs";
import { BundleSchema, analysisInputFromRaw, compareFigures } from "../app/domain/bundle.ts";
import { analyzeStudy } from "../app/domain/study-analysis.ts";
import { canonicalHash } from "../app/domain/canonical-hash.ts";

export function reanalyze(text: string): { ok: boolean; lines: string[] } {
  const lines: string[] = [];
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (e) {
    return { ok: false, lines: [`The file is not JSON: ${(e as Error).message}`] };
  }
  const parsed = BundleSchema.safeParse(json);
  if (!parsed.success) {
    return { ok: false, lines: ["The file is not a valid Blindcut bundle:", ...parsed.error.issues.slice(0, 20).map((i) => `  ${i.path.join(".") || "(root)"}: ${i.message}`)] };
  }
  const bundle = parsed.data;
  let ok = true;
  if (canonicalHash(bundle.raw) !== bundle.hashes.raw) {
    ok = false;
    lines.push("The raw data does not match its recorded hash: it was changed after export.");
  }
  const recomputed = JSON.parse(JSON.stringify(analyzeStudy(analysisInputFromRaw(bundle.raw))));
  const differences = compareFigures(bundle.analysis, recomputed);
  for (const d of differences.slice(0, 50)) lines.push(`DIFFERS ${d.path}: recorded ${JSON.stringify(d.stored)}, recomputed ${JSON.stringify(d.recomputed)}`);
  if (differences.length > 50) lines.push(`… and ${differences.length - 50} more differences`);
  if (differences.length) ok = false;
  lines.push(ok ? `OK: every figure of "${bundle.raw.study.shortName}" matches (${bundle.raw.readings.length} readings, ${bundle.raw.runs.length} runs).` : `FAILED: ${differences.length} figure(s) differ.`);
  return { ok, lines };
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const file = process.argv[2];
  if (!file) {
    console.error("Usage: npm run reanalyze -- <bundle.json>");
    process.exit(2);
  }
  const { ok, lines } = reanalyze(readFileSync(file, "utf8"));
  for (const line of lines) console.log(line);
  process.exit(ok ? 0 : 1);
}
