/**
 * Times the analysis of a synthetic parallel study: per-run outcomes from the raw
 * readings, arm descriptives, bootstrap intervals, comparisons and Kaplan–Meier /
 * log-rank. Default study: 200 blades x 3 replicates x 40 checks x 3 positions
 * (72,000 readings), and the same at 10x the blades. The readings are invented by a
 * seeded generator. Run: npx tsx scripts/bench-analysis.ts
 */
import seedrandom from "seedrandom";
import { performance } from "node:perf_hooks";
import { forceRunOutcomes, type ForceProtocol, type ForceReading } from "../app/domain/outcomes.ts";
import { analyzeParallelArms, type RunOutcomeRecord } from "../app/domain/stats/index.ts";

export interface SyntheticRun {
  runId: string;
  bladeId: string;
  arm: string;
  readings: ForceReading[];
}

export interface BenchStudy {
  protocol: ForceProtocol;
  runs: SyntheticRun[];
  readingCount: number;
}

/**
 * Builds a seeded synthetic study: blades split evenly over two arms; each run's edge
 * force rises linearly from a fresh-edge baseline (about 150 gf) toward the threshold
 * (400 gf), with noise per position. Every run records all 40 checks (cut 0 to the cap
 * at 390 cuts), as the benchmark's size asks: the threshold is crossed, if at all, only at
 * the last check, so a run either ends at threshold at its 40th check or is censored at
 * the cap. The numbers are invented and only the amount of work matters here.
 */
export function buildSyntheticStudy(options: { blades?: number; replicates?: number; checks?: number; seed?: string } = {}): BenchStudy {
  const blades = options.blades ?? 200;
  const replicates = options.replicates ?? 3;
  const checks = options.checks ?? 40;
  const rng = seedrandom(options.seed ?? "bench-analysis-v1");
  const positions = ["heel", "middle", "tip"];
  const threshold = 400;
  const cap = (checks - 1) * 10;
  const protocol: ForceProtocol = { threshold, confirm: false, cap, checkEvery: 10, aggregation: "mean", positions };
  const gauss = () => Math.sqrt(-2 * Math.log(1 - rng())) * Math.cos(2 * Math.PI * rng());
  const runs: SyntheticRun[] = [];
  let readingCount = 0;
  for (let b = 0; b < blades; b++) {
    const arm = b % 2 === 0 ? "Arm A" : "Arm B";
    const bladeShift = arm === "Arm A" ? 0 : 8;
    for (let r = 0; r < replicates; r++) {
      const base = 150 + 10 * gauss();
      // Cut at which the aggregate would reach the threshold: near the cap, some beyond it.
      const crossing = cap - 6 + bladeShift + 6 * gauss();
      const slope = (threshold - base) / Math.max(cap * 0.9, crossing);
      const readings: ForceReading[] = [];
      for (let c = 0; c < checks; c++) {
        const cut = c * 10;
        for (const position of positions) {
          let value = base + slope * cut + 3 * gauss();
          if (cut < cap) value = Math.min(value, threshold - 5); // only the last check may reach T
          readings.push({ cut, position, kind: "check", value: Math.max(1, value), id: `${b}-${r}-${c}-${position}` });
        }
      }
      readingCount += readings.length;
      runs.push({ runId: `${b}-${r}`, bladeId: `blade-${b}`, arm, readings });
    }
  }
  return { protocol, runs, readingCount };
}

/** Everything the analysis page computes, from raw readings to comparisons and survival. */
export function analyzeStudy(study: BenchStudy): ReturnType<typeof analyzeParallelArms> {
  const records: RunOutcomeRecord[] = study.runs.map((run) => {
    const o = forceRunOutcomes(study.protocol, run.readings);
    if (o.cutsToThreshold === null) throw new Error(`run ${run.runId}: failed sharpening in synthetic data`);
    return { runId: run.runId, bladeId: run.bladeId, arm: run.arm, value: o.cutsToThreshold, censored: o.censored };
  });
  return analyzeParallelArms(records, { seed: "bench", resamples: 10_000 });
}

export interface Timing {
  label: string;
  readings: number;
  runs: number;
  repetitions: number;
  medianMs: number;
  minMs: number;
  maxMs: number;
}

/**
 * Times analyzeStudy on a synthetic study: median, min and max of `repetitions` runs.
 * Exported so `npm run benchmark` can call it.
 */
export function timeAnalysis(options: { blades?: number; replicates?: number; checks?: number; repetitions?: number; label?: string } = {}): Timing {
  const study = buildSyntheticStudy(options);
  const reps = options.repetitions ?? 5;
  const times: number[] = [];
  for (let i = 0; i < reps; i++) {
    const t0 = performance.now();
    analyzeStudy(study);
    times.push(performance.now() - t0);
  }
  times.sort((a, b) => a - b);
  return {
    label: options.label ?? `${options.blades ?? 200} blades`,
    readings: study.readingCount,
    runs: study.runs.length,
    repetitions: reps,
    medianMs: times[Math.floor(reps / 2)],
    minMs: times[0],
    maxMs: times[reps - 1],
  };
}

function main(): void {
  for (const t of [timeAnalysis({ blades: 200, label: "200 blades x 3 x 40 x 3" }), timeAnalysis({ blades: 2000, label: "2,000 blades (10x)" })]) {
    console.log(
      `${t.label}: ${t.readings.toLocaleString("en")} readings, ${t.runs} runs: median ${t.medianMs.toFixed(0)} ms (min ${t.minMs.toFixed(0)}, max ${t.maxMs.toFixed(0)}) over ${t.repetitions} repetitions`,
    );
  }
}

if (import.meta.url === `file://${process.argv[1]}`) main();
