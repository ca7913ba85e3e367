/**
 * Times the blade mixed model (REML, blade random intercept) on a seeded synthetic parallel
 * study: arm + blade hardness + run baseline + media lot, 200 blades x 3 replicates (600 runs)
 * and the same at 10x the blades. `npm run benchmark` calls timeMixedModel and writes the
 * section; run alone, this script measures and rewrites only its own section of
 * docs/benchmarks.md (between the mixed-model markers), without the slow HTTP benchmarks:
 *   npx tsx scripts/bench-models.ts
 * The data are invented by a seeded generator; only the amount of work matters here.
 */
import { readFileSync, writeFileSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { performance } from "node:perf_hooks";
import seedrandom from "seedrandom";
import { fitBladeModel, type ModelRun } from "../app/domain/stats/index.ts";

export interface MixedModelTiming {
  label: string;
  blades: number;
  runs: number;
  repetitions: number;
  medianMs: number;
  minMs: number;
  maxMs: number;
}

/** Seeded synthetic runs: two arms, hardness per blade, baseline per run, four media lots. */
export function syntheticModelRuns(blades: number, replicates: number, seed = "bench-models-v1"): ModelRun[] {
  const rng = seedrandom(seed);
  const gauss = () => Math.sqrt(-2 * Math.log(1 - rng())) * Math.cos(2 * Math.PI * rng());
  const runs: ModelRun[] = [];
  for (let b = 0; b < blades; b++) {
    const arm = b % 2 === 0 ? "Arm A" : "Arm B";
    const hardness = 60 + 1.5 * gauss();
    const u = 8 * gauss();
    for (let r = 0; r < replicates; r++) {
      const baseline = 150 + 10 * gauss();
      runs.push({
        bladeId: `blade-${b}`, arm,
        value: 300 + (arm === "Arm B" ? 12 : 0) + 6 * (hardness - 60) - 0.4 * (baseline - 150) + u + 10 * gauss(),
        covariates: { hardness, baseline },
        factors: { "media lot": `lot ${1 + Math.floor(rng() * 4)}` },
      });
    }
  }
  return runs;
}

/** Median, min and max time of fitBladeModel over `repetitions` fits (after three warm-up fits, so the JIT has settled). */
export function timeMixedModel(options: { blades: number; replicates?: number; repetitions?: number; label: string }): MixedModelTiming {
  const runs = syntheticModelRuns(options.blades, options.replicates ?? 3);
  const reps = options.repetitions ?? 21;
  const fit = () => fitBladeModel(runs, { reference: "Arm A", covariates: ["hardness", "baseline"], factors: ["media lot"] });
  for (let i = 0; i < 3; i++) fit();
  const times: number[] = [];
  for (let i = 0; i < reps; i++) {
    const t0 = performance.now();
    fit();
    times.push(performance.now() - t0);
  }
  times.sort((a, b) => a - b);
  return { label: options.label, blades: options.blades, runs: runs.length, repetitions: reps, medianMs: times[Math.floor(reps / 2)], minMs: times[0], maxMs: times[reps - 1] };
}

/** Both sizes the issue names: 600 runs and 6,000 runs. */
export function timeMixedModels(repetitions = 21): MixedModelTiming[] {
  return [
    timeMixedModel({ blades: 200, label: "200 blades × 3 replicates", repetitions }),
    timeMixedModel({ blades: 2000, label: "2,000 blades × 3 replicates (10×)", repetitions }),
  ];
}

export const MIXED_MODEL_START = "<!-- mixed-model:start -->";
export const MIXED_MODEL_END = "<!-- mixed-model:end -->";

/** The docs/benchmarks.md section, between its markers. */
export function mixedModelSection(timings: MixedModelTiming[], when: string): string {
  const fmt = (v: number) => (v < 10 ? v.toFixed(1) : Math.round(v).toLocaleString("en"));
  const ratio = timings.length === 2 ? timings[1].medianMs / timings[0].medianMs : null;
  return [
    MIXED_MODEL_START,
    "## Mixed model",
    "",
    `\`timeMixedModel\` (scripts/bench-models.ts), measured ${when} UTC: \`fitBladeModel\` by REML with a blade random intercept, fixed arm, blade hardness, run baseline and a four-level media lot (7 coefficients), Satterthwaite df for every coefficient, on seeded synthetic runs. Median of ${timings[0]?.repetitions ?? 21} fits after three warm-up fits, min–max in the table. Run alone with \`npx tsx scripts/bench-models.ts\`.`,
    "",
    "| study | blades | runs | median | min | max |",
    "|---|---|---|---|---|---|",
    ...timings.map((t) => `| ${t.label} | ${t.blades.toLocaleString("en")} | ${t.runs.toLocaleString("en")} | ${fmt(t.medianMs)} ms | ${fmt(t.minMs)} ms | ${fmt(t.maxMs)} ms |`),
    "",
    ratio === null ? "" : `Ratio 10× / 1× of the medians: **${ratio.toFixed(2)}** (the runs are read once into per-blade totals; the REML search then works on those alone).`,
    MIXED_MODEL_END,
  ].join("\n");
}

/** Replaces the section in a benchmarks document (or appends it before the Commands section). */
export function withMixedModelSection(markdown: string, section: string): string {
  const start = markdown.indexOf(MIXED_MODEL_START);
  const end = markdown.indexOf(MIXED_MODEL_END);
  if (start >= 0 && end > start) return markdown.slice(0, start) + section + markdown.slice(end + MIXED_MODEL_END.length);
  const commands = markdown.indexOf("\n## Commands");
  if (commands >= 0) return `${markdown.slice(0, commands)}\n${section}\n${markdown.slice(commands)}`;
  return `${markdown.trimEnd()}\n\n${section}\n`;
}

function main(): void {
  const timings = timeMixedModels();
  for (const t of timings) {
    console.log(`${t.label}: ${t.runs} runs: median ${t.medianMs.toFixed(1)} ms (min ${t.minMs.toFixed(1)}, max ${t.maxMs.toFixed(1)}) over ${t.repetitions} fits`);
  }
  const file = path.join(path.dirname(fileURLToPath(import.meta.url)), "..", "docs", "benchmarks.md");
  const when = new Date().toISOString().slice(0, 16).replace("T", " ");
  writeFileSync(file, withMixedModelSection(readFileSync(file, "utf8"), mixedModelSection(timings, when)));
  console.log("docs/benchmarks.md: mixed-model section written");
}

if (import.meta.url === `file://${process.argv[1]}`) main();
