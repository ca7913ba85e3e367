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

/** The rows of one outcome: the primary, or one secondary outcome analysed the same way. */
function outcomeView(analysis: StudyAnalysis, names: ReturnType<typeof armNames>) {
  const label = (key: string) => ({ key, name: names?.get(key)?.name ?? null });
  const p = analysis.parallel;
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
      kmMedian: p.survival?.curves.find((c) => c.arm === a.arm)?.km.median ?? null,
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
    })) ?? [];
  const o = analysis.primaryOutcome;
  return {
    // A snapshot taken before outcomes carried their rule: working sharpness was then over each run's own length.
    outcome: { ...o, definition: o.definition ?? (o.key === "working_sharpness" ? workingSharpnessRuleInWords(null) : null) },
    design: analysis.design,
    arms,
    comparisons,
    logRank: logRank ? { chiSquare: logRank.chiSquare, df: logRank.df, p: logRank.p } : null,
    survivalNote: p?.survival?.note ?? null,
    withinBlade,
    flow: analysis.flow,
    warnings: analysis.warnings,
    error: analysis.error,
    nBlades: p?.nBlades ?? analysis.withinBlade?.pairs[0]?.nBlades ?? 0,
    nRuns: p?.nRuns ?? analysis.flow.analysed,
  };
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
  const survival =
    analysis.parallel?.survival?.curves.flatMap((c) => [
      { arm: display(c.arm), time: 0, survival: 1, lower: 1, upper: 1 },
      ...c.km.steps.map((s) => ({ arm: display(c.arm), time: s.time, survival: s.survival, lower: s.lower, upper: s.upper })),
    ]) ?? [];
  return { outcome: analysis.primaryOutcome, runCurves, armCurves, armIntervals, effects, survival };
}
