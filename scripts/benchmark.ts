// `npm run benchmark`: figures measured on this machine, written to docs/benchmarks.md.
// Not part of `npm test`. For now: the analysis core on synthetic studies.
import { writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { timeAnalysis, type Timing } from "./bench-analysis.ts";

const small = timeAnalysis({ blades: 200, label: "200 blades × 3 replicates × 40 checks × 3 positions" });
const large = timeAnalysis({ blades: 2000, label: "2,000 blades (10×)" });
const row = (t: Timing) => `| ${t.label} | ${t.readings.toLocaleString("en")} | ${t.runs.toLocaleString("en")} | ${t.medianMs.toFixed(0)} | ${t.minMs.toFixed(0)} | ${t.maxMs.toFixed(0)} |`;
const lines = [
  "# Benchmarks",
  "",
  `Measured ${new Date().toISOString().slice(0, 16).replace("T", " ")} UTC on ${os.cpus().length} × ${os.cpus()[0]?.model ?? "unknown CPU"}, Node.js ${process.version}, with \`npm run benchmark\`. The machine is shared and noisy: read the ratio, measured in the same run, before the absolute figures.`,
  "",
  "## Analysis core",
  "",
  "Every per-run outcome, arm descriptive, 10,000-resample bootstrap interval, comparison and Kaplan–Meier/log-rank of a synthetic parallel study (seeded generator), each figure the median of 5 repetitions, in ms.",
  "",
  "| study | readings | runs | median | min | max |",
  "|---|---|---|---|---|---|",
  row(small),
  row(large),
  "",
  `Ratio 10× / 1×: ${(large.medianMs / small.medianMs).toFixed(2)} (linear growth would be 10).`,
  "",
];
writeFileSync(path.resolve(import.meta.dirname, "../docs/benchmarks.md"), lines.join("\n"));
console.log(lines.join("\n"));
