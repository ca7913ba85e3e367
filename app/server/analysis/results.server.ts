import type { StudyAnalysis } from "~/domain/study-analysis.ts";
import { workingSharpnessRuleInWords } from "~/domain/outcomes.ts";
import type { StudyRecord } from "./study-data.server.ts";

/**
 * The rows the results page, the report and the chart API show, computed from a
 * stored analysis. Arm names appear only when the study is unblinded: before that
 * this module never reads them, so nothing downstream can leak them.
 */
export function armNames(record: Pick<StudyRecord, "study" | "arms">): Map<string, { name: string; description: string }> | null {
  if (record.study.state !== "unblinded") return null;
  return new Map(record.arms.map((a) => [a.neutralLabel ?? a.id, { name: a.name, description: a.description }]));
}

type Interval = { lower: number; upper: number } | null;
const iv = (m: { value: { lower: number; upper: number } | null } | undefined): Interval => (m?.value ? { lower: m.value.lower, upper: m.value.upper } : null);

/** Text that goes with the Holm-adjusted p-values: the intervals beside them are not adjusted. */
export const HOLM_NOTE = "Holm p is adjusted for the comparisons in this table; the intervals beside it are not adjusted (each is a 95 % interval on its own).";

type KmMedianView = { estimate: number | null; lower: number | null; upper: number | null; reached: boolean; rule: string | null };

/** The rows of one outcome: the primary, or one secondary outcome analysed the same way. */
function outcomeView(analysis: StudyAnalysis, names: ReturnType<typeof armNames>) {
  const label = (key: string) => ({ key, name: names?.get(key)?.name ?? null });
  const p = analysis.parallel;
  const rmstOf = (arm: string) => {
    const r = p?.survival?.rmst?.arms.find((x) => x.arm === arm)?.result.value;
    return r ? { estimate: r.estimate, se: r.se, lower: r.lower, upper: r.upper, tau: r.tau } : null;
  };
  const anyCensored = (p?.arms ?? []).some((a) => a.nCensoredRuns > 0);
  const arms =
    p?.arms.map((a) => ({
      arm: label(a.arm),
      nBlades: a.nBlades,
      nRuns: a.nRuns,
      mean: a.descriptives.mean,
      sd: a.descriptives.sd,
      median: a.descriptives.median,
      tInterval: iv(a.tInterval),
      bootstrap: iv(a.bootstrap),
      censoredShare: a.censoredShare,
      lowerBound: a.lowerBound,
      kmMedian: kmMedianView(p.survival?.curves.find((c) => c.arm === a.arm)?.km.median),
      nCensoredRuns: a.nCensoredRuns,
      /** The arm row's own caveat: with censored runs its mean is a lower bound. */
      censorWarning: a.warnings.find((w) => w.includes("lower bound")) ?? null,
      bootstrapDistinctResamples: a.bootstrapDistinctResamples ?? null,
      rmst: anyCensored ? rmstOf(a.arm) : null,
    })) ?? [];
  const comparisons =
    p?.comparisons?.value?.comparisons.map((c) => ({
      a: label(c.a),
      b: label(c.b),
      difference: c.welch.difference,
      differenceInterval: { lower: c.welch.lower, upper: c.welch.upper },
      df: c.welch.df,
      p: c.welch.p,
      pHolm: c.pWelchHolm,
      g: c.effect.g,
      gInterval: { lower: c.effect.lower, upper: c.effect.upper },
      gMethod: `Hedges' g (J ${c.effect.jMethod}), interval by ${c.effect.intervalMethod}`,
      mannWhitneyP: c.mannWhitney.p,
      mannWhitneyPHolm: c.pMannWhitneyHolm,
      mannWhitneyMethod: c.mannWhitney.pMethod,
      method: "Welch two-sample t on blade means, Holm-adjusted",
      censorWarning: p.comparisonWarnings?.find((w) => w.a === c.a && w.b === c.b)?.warning ?? null,
      rmstDifference: (() => {
        if (!anyCensored) return null;
        const d = p.survival?.rmst?.differences.find((x) => x.value?.a === c.a && x.value?.b === c.b)?.value;
        return d ? { difference: d.difference, lower: d.lower, upper: d.upper, p: d.p, tau: d.tau } : null;
      })(),
    })) ?? [];
  const logRank = p?.survival?.logRank?.value ?? null;
  const withinBlade =
    analysis.withinBlade?.pairs.map((w) => ({
      a: label(w.conditions[0]),
      b: label(w.conditions[1]),
      nBlades: w.nBlades,
      nRuns: w.nRuns,
      meanDifference: w.descriptives.mean,
      sdDifference: w.descriptives.sd,
      pairedInterval: w.pairedT.value ? { lower: w.pairedT.value.lower, upper: w.pairedT.value.upper } : null,
      p: w.pairedT.value?.p ?? null,
      pHolm: w.pPairedHolm,
      wilcoxonP: w.wilcoxon.value?.p ?? null,
      wilcoxonMethod: w.wilcoxon.value ? `${w.wilcoxon.value.pMethod}, zeros: ${w.wilcoxon.value.zeroMethod}` : null,
      dz: w.dz.value?.dz ?? null,
      dzInterval: w.dz.value ? { lower: w.dz.value.lower, upper: w.dz.value.upper } : null,
      censoredShare: w.censoredShare,
      nCensoredRuns: w.nCensoredRuns,
      censorWarning: w.censorWarning ?? null,
    })) ?? [];
  const o = analysis.primaryOutcome;
  return {
    // A snapshot taken before outcomes carried their rule: working sharpness was then over each run's own length.
    outcome: { ...o, definition: o.definition ?? (o.key === "working_sharpness" ? workingSharpnessRuleInWords(null) : null) },
    design: analysis.design,
    arms,
    comparisons,
    logRank: logRank ? { chiSquare: logRank.chiSquare, df: logRank.df, p: logRank.p, validForInference: p?.survival?.logRankValidForInference ?? false } : null,
    holmNote: HOLM_NOTE,
    rmstTau: anyCensored ? (p?.survival?.rmst?.tau ?? null) : null,
    survivalNote: p?.survival?.note ?? null,
    withinBlade,
    // Rebuilt field by field: only categories reach the page, whatever an older snapshot holds.
    flow: {
      enrolledBlades: analysis.flow.enrolledBlades,
      runs: analysis.flow.runs,
      analysed: analysis.flow.analysed,
      endedAtThreshold: analysis.flow.endedAtThreshold,
      censored: analysis.flow.censored,
      withdrawn: analysis.flow.withdrawn.map((w) => ({ runId: w.runId, bladeKey: w.bladeKey, armKey: w.armKey ?? null, category: w.category ?? null, afterEnd: w.afterEnd ?? false })),
      excluded: analysis.flow.excluded,
      perArm: (analysis.flow.perArm ?? []).map((f) => ({ ...f, arm: label(f.armKey) })),
    },
    warnings: analysis.warnings,
    error: analysis.error,
    nBlades: p?.nBlades ?? analysis.withinBlade?.pairs[0]?.nBlades ?? 0,
    nRuns: p?.nRuns ?? analysis.flow.analysed,
  };
}

function kmMedianView(m: { estimate: number | null; lower: number | null; upper: number | null; reached: boolean; rule?: string } | undefined): KmMedianView | null {
  return m ? { estimate: m.estimate, lower: m.lower, upper: m.upper, reached: m.reached, rule: m.rule ?? null } : null;
}

/** Cuts at which the survival chart prints the number at risk: 0, quarters of the horizon. */
export function atRiskCuts(horizon: number): number[] {
  if (!Number.isFinite(horizon) || horizon <= 0) throw new Error(`atRiskCuts: the horizon must be a finite number > 0, got ${String(horizon)}`);
  return [0, 0.25, 0.5, 0.75, 1].map((f) => Math.round(f * horizon));
}

export function resultsView(analysis: StudyAnalysis, names: ReturnType<typeof armNames>) {
  return {
    ...outcomeView(analysis, names),
    // Each declared secondary outcome through the same rows; never the headline.
    secondary: (analysis.secondary ?? []).map((s) => ({
      note: s.note,
      analysed: s.analysed,
      ...outcomeView({ ...analysis, primaryOutcome: s.outcome as StudyAnalysis["primaryOutcome"], parallel: s.parallel, withinBlade: s.withinBlade, warnings: s.warnings, error: s.error }, names),
    })),
  };
}

/** The numbers the charts draw, arms by label (and name after unblinding). */
export function chartData(analysis: StudyAnalysis, names: ReturnType<typeof armNames>) {
  const display = (key: string) => (names?.get(key) ? `${key} · ${names.get(key)!.name}` : key);
  const runCurves = analysis.runs.flatMap((r) => r.curve.map((pt) => ({ run: `${r.bladeKey} #${r.replicate}`, arm: display(r.armKey), cut: pt.cut, aggregate: pt.aggregate })));
  const armCurves = analysis.armCurves.flatMap((a) => a.points.map((pt) => ({ arm: display(a.armKey), cut: pt.cut, mean: pt.mean, n: pt.n })));
  const view = resultsView(analysis, names);
  const armIntervals = view.arms.map((a) => ({ arm: display(a.arm.key), mean: a.mean, lower: a.tInterval?.lower ?? null, upper: a.tInterval?.upper ?? null, bootLower: a.bootstrap?.lower ?? null, bootUpper: a.bootstrap?.upper ?? null, nBlades: a.nBlades }));
  const effects = [
    ...view.comparisons.map((c) => ({ pair: `${display(c.a.key)} − ${display(c.b.key)}`, estimate: c.g, lower: c.gInterval.lower, upper: c.gInterval.upper, measure: "Hedges' g" })),
    ...view.withinBlade.filter((w) => w.dz !== null).map((w) => ({ pair: `${display(w.a.key)} − ${display(w.b.key)}`, estimate: w.dz!, lower: w.dzInterval!.lower, upper: w.dzInterval!.upper, measure: "d_z" })),
  ];
  const curves = analysis.parallel?.survival?.curves ?? [];
  const tau = analysis.parallel?.survival?.rmst?.tau ?? null;
  // Each curve is carried on to the cap (or, without one, the last observed time of any arm).
  const lastTime = (c: (typeof curves)[number]) => Math.max(0, ...c.km.steps.map((s) => s.time), ...c.km.censorTimes);
  const horizon = tau ?? Math.max(0, ...curves.map(lastTime));
  const survival = curves.flatMap((c) => {
    const end = tau ?? lastTime(c);
    const pts = [
      { arm: display(c.arm), time: 0, survival: 1, lower: 1 as number | null, upper: 1 as number | null, atRisk: c.km.n },
      ...c.km.steps.map((s) => ({ arm: display(c.arm), time: s.time, survival: s.survival, lower: s.lower, upper: s.upper, atRisk: s.atRisk })),
    ];
    const last = pts[pts.length - 1];
    // A flat tail (no events after the last step, or no events at all) still needs a line to its end.
    if (end > last.time) pts.push({ ...last, time: end, atRisk: c.km.censorTimes.filter((t) => t >= end).length });
    return pts;
  });
  const censorTicks = curves.flatMap((c) =>
    c.km.censorTimes.map((time) => {
      const before = c.km.steps.filter((s) => s.time <= time);
      return { arm: display(c.arm), time, survival: before.length ? before[before.length - 1].survival : 1 };
    }),
  );
  const atRisk = horizon > 0
    ? curves.flatMap((c) => {
        const all = analysis.runs.filter((r) => r.armKey === c.arm && r.value !== null);
        return atRiskCuts(horizon).map((cut) => ({ arm: display(c.arm), cut, n: all.filter((r) => r.value! >= cut).length }));
      })
    : [];
  const medians = curves.map((c) => ({ arm: display(c.arm), ...(kmMedianView(c.km.median) ?? { estimate: null, lower: null, upper: null, reached: false, rule: null }) }));
  return {
    outcome: analysis.primaryOutcome, runCurves, armCurves, armCurveRule: analysis.armCurveRule ?? null, armIntervals, effects,
    survival, censorTicks, atRisk, medians, survivalHorizon: horizon,
    censorCaveats: [...view.comparisons.map((c) => c.censorWarning), ...view.withinBlade.map((w) => w.censorWarning)].filter((w): w is string => !!w),
  };
}
