import { useEffect, useMemo, useState } from "react";
import type { VisualizationSpec } from "vega-embed";
import { VegaChart, CHART_COLORS } from "./vega-chart.tsx";

export type ChartData = {
  outcome: { label: string; unit: string; key: string };
  runCurves: { run: string; arm: string; cut: number; aggregate: number }[];
  armCurves: { arm: string; cut: number; mean: number; n: number }[];
  armIntervals: { arm: string; mean: number; lower: number | null; upper: number | null; bootLower: number | null; bootUpper: number | null; nBlades: number }[];
  armCurveRule: string | null;
  effects: { pair: string; estimate: number; lower: number; upper: number; measure: string }[];
  survival: { arm: string; time: number; survival: number; lower: number | null; upper: number | null; atRisk: number }[];
  censorTicks?: { arm: string; time: number; survival: number }[];
  atRisk?: { arm: string; cut: number; n: number }[];
  medians?: { arm: string; estimate: number | null; lower: number | null; upper: number | null; reached: boolean; rule: string | null }[];
  survivalHorizon?: number;
  /** Censoring caveats of the comparisons drawn (effect sizes), one per comparison. */
  censorCaveats?: string[];
};

const orNotReached = (v: number | null) => (v === null ? "not reached" : v.toFixed(1));
const medianText = (m: NonNullable<ChartData["medians"]>[number]) =>
  m.estimate === null ? `${m.arm}: not reached` : `${m.arm}: ${m.estimate.toFixed(1)} cuts (95 % interval ${orNotReached(m.lower)} to ${orNotReached(m.upper)})`;

const num = (digits: number) => (v: unknown) => (typeof v === "number" ? v.toFixed(digits) : "—");

/** The results charts: the numbers come from the JSON API in the client, with a loading state. */
export function ResultsCharts({ url, threshold }: { url: string; threshold: number | null }) {
  const [state, setState] = useState<{ kind: "loading" } | { kind: "ready"; data: ChartData } | { kind: "error"; message: string }>({ kind: "loading" });
  useEffect(() => {
    let cancelled = false;
    fetch(url, { headers: { Accept: "application/json" } })
      .then(async (res) => {
        if (!res.ok) throw new Error((await res.json().catch(() => ({})))?.error ?? `The analysis could not be loaded (${res.status})`);
        return res.json() as Promise<ChartData>;
      })
      .then((data) => !cancelled && setState({ kind: "ready", data }))
      .catch((e: Error) => !cancelled && setState({ kind: "error", message: e.message }));
    return () => {
      cancelled = true;
    };
  }, [url]);

  const specs = useMemo(() => (state.kind === "ready" ? buildSpecs(state.data, threshold) : null), [state, threshold]);
  if (state.kind === "loading") return <p role="status" className="rounded border border-rule bg-card p-6 text-graphite-600">Loading the analysis for the charts…</p>;
  if (state.kind === "error") return <p role="alert" className="rounded border-l-4 border-fault bg-fault-soft p-3 font-bold text-fault">{state.message}</p>;
  const d = state.data;
  return (
    <div className="grid gap-6" data-testid="results-charts">
      {d.runCurves.length ? (
        <VegaChart
          testId="chart-curves"
          spec={specs!.curves}
          title="Sharpness curves"
          description={`Sharpness reading (gf) against cuts for every run, thin lines, and each arm's mean curve, thick lines${threshold ? `, with the threshold at ${threshold} gf` : ""}. ${d.armCurveRule ? `Rule: ${d.armCurveRule}.` : ""}`}
          table={{ caption: "Arm mean curve: mean aggregate reading at each cut, over the runs still going (n)", columns: [{ key: "arm", label: "Arm" }, { key: "cut", label: "Cut", numeric: true }, { key: "mean", label: "Mean (gf)", numeric: true, format: num(1) }, { key: "n", label: "Runs still going (n)", numeric: true }], rows: d.armCurves }}
          notes={d.armCurveRule ? <p data-testid="arm-curve-rule">Thick lines: {d.armCurveRule}; past that point the mean would average only the longest-lasting runs.</p> : null}
        />
      ) : null}
      {d.armIntervals.length ? (
        <VegaChart
          testId="chart-intervals"
          spec={specs!.intervals}
          title={`${d.outcome.label} by arm`}
          description={`Mean ${d.outcome.label.toLowerCase()} per arm with its 95 % t-interval, blade means as the unit.`}
          table={{ caption: `${d.outcome.label} (${d.outcome.unit}) per arm`, columns: [{ key: "arm", label: "Arm" }, { key: "nBlades", label: "Blades", numeric: true }, { key: "mean", label: "Mean", numeric: true, format: num(2) }, { key: "lower", label: "95 % t lower", numeric: true, format: num(2) }, { key: "upper", label: "95 % t upper", numeric: true, format: num(2) }, { key: "bootLower", label: "Bootstrap lower", numeric: true, format: num(2) }, { key: "bootUpper", label: "Bootstrap upper", numeric: true, format: num(2) }], rows: d.armIntervals }}
          height={200}
          notes={d.censorCaveats?.length ? <p className="font-bold">▲ An arm with censored runs has a mean that is a lower bound of its true mean.</p> : null}
        />
      ) : null}
      {d.effects.length ? (
        <VegaChart
          testId="chart-effects"
          spec={specs!.effects}
          title="Effect sizes"
          description="Standardized effect size of each comparison with its 95 % interval; zero means no difference."
          table={{ caption: "Effect sizes with 95 % intervals", columns: [{ key: "pair", label: "Comparison" }, { key: "measure", label: "Measure" }, { key: "estimate", label: "Estimate", numeric: true, format: num(2) }, { key: "lower", label: "Lower", numeric: true, format: num(2) }, { key: "upper", label: "Upper", numeric: true, format: num(2) }], rows: d.effects }}
          height={160}
          notes={d.censorCaveats?.length ? d.censorCaveats.map((c) => <p key={c} className="font-bold" data-testid="effects-censor-caveat">▲ {c}</p>) : null}
        />
      ) : null}
      {d.survival.length ? (
        <VegaChart
          testId="chart-survival"
          spec={specs!.survival}
          title="Runs still above the stop mark (Kaplan–Meier)"
          description="Share of runs that have not yet reached the threshold against cuts, per arm, as Kaplan–Meier step curves with a shaded pointwise 95 % band, a vertical tick at each censored run, each curve carried on to the cap, dashed lines at each arm's median, and the number of runs at risk printed under the curves."
          height={300 + 24 * (new Set(d.survival.map((s) => s.arm)).size + 1)}
          table={{ caption: "Kaplan–Meier estimate per arm (pointwise 95 % band on the log(−log) scale; no band where S = 0)", columns: [{ key: "arm", label: "Arm" }, { key: "time", label: "Cuts", numeric: true, format: num(2) }, { key: "atRisk", label: "At risk", numeric: true }, { key: "survival", label: "Share not yet dull", numeric: true, format: num(3) }, { key: "lower", label: "Lower", numeric: true, format: num(3) }, { key: "upper", label: "Upper", numeric: true, format: num(3) }], rows: d.survival }}
          moreTables={[
            { caption: "Censored runs (ticks)", columns: [{ key: "arm", label: "Arm" }, { key: "time", label: "Censored at (cuts)", numeric: true, format: num(1) }], rows: d.censorTicks ?? [] },
            { caption: "Number at risk", columns: [{ key: "arm", label: "Arm" }, { key: "cut", label: "Cut", numeric: true }, { key: "n", label: "Runs at risk", numeric: true }], rows: d.atRisk ?? [] },
            { caption: "Kaplan–Meier median per arm", columns: [{ key: "arm", label: "Arm" }, { key: "estimate", label: "Median (cuts)", numeric: true, format: (v) => (typeof v === "number" ? v.toFixed(1) : "not reached") }, { key: "lower", label: "95 % lower", numeric: true, format: (v) => (typeof v === "number" ? v.toFixed(1) : "not reached") }, { key: "upper", label: "95 % upper", numeric: true, format: (v) => (typeof v === "number" ? v.toFixed(1) : "not reached") }], rows: d.medians ?? [] },
          ]}
          notes={
            <>
              {d.medians?.length ? <p data-testid="km-medians"><strong>Median cuts to threshold (Kaplan–Meier):</strong> {d.medians.map(medianText).join("; ")}.</p> : null}
              {d.medians?.[0]?.rule ? <p>Median rule: {d.medians[0].rule}. Interval: Brookmeyer &amp; Crowley (1982), from the pointwise band.</p> : null}
              <p>Ticks: censored runs (still above the threshold at the cap). The band is pointwise, not simultaneous; runs are the units.</p>
            </>
          }
        />
      ) : null}
    </div>
  );
}

export function buildSpecs(d: ChartData, threshold: number | null): Record<"curves" | "intervals" | "effects" | "survival", VisualizationSpec> {
  const width = "container" as const;
  const color = { field: "arm", type: "nominal", title: "Arm" } as const;
  return {
    curves: {
      $schema: "https://vega.github.io/schema/vega-lite/v6.json",
      width,
      height: 300,
      layer: [
        { data: { values: d.runCurves }, mark: { type: "line", strokeWidth: 1, opacity: 0.35 }, encoding: { x: { field: "cut", type: "quantitative", title: "Cuts" }, y: { field: "aggregate", type: "quantitative", title: "Reading (gf)" }, detail: { field: "run" }, color } },
        { data: { values: d.armCurves }, mark: { type: "line", strokeWidth: 4, point: { size: 20 } }, encoding: { x: { field: "cut", type: "quantitative" }, y: { field: "mean", type: "quantitative" }, color, tooltip: [{ field: "arm", title: "Arm" }, { field: "cut", title: "Cut" }, { field: "mean", title: "Mean (gf)", format: ".1f" }, { field: "n", title: "Runs still going (n)" }] } },
        ...(threshold ? [{ data: { values: [{ t: threshold }] }, mark: { type: "rule" as const, color: CHART_COLORS.signal, strokeDash: [6, 4], strokeWidth: 2 }, encoding: { y: { field: "t", type: "quantitative" as const } } }] : []),
      ],
    } as VisualizationSpec,
    intervals: {
      $schema: "https://vega.github.io/schema/vega-lite/v6.json",
      width,
      height: 40 * Math.max(2, d.armIntervals.length),
      data: { values: d.armIntervals },
      layer: [
        { mark: { type: "rule", strokeWidth: 3 }, encoding: { y: { field: "arm", type: "nominal", title: null }, x: { field: "lower", type: "quantitative", title: `${d.outcome.label} (${d.outcome.unit})`, scale: { zero: false } }, x2: { field: "upper" }, color: { ...color, legend: null } } },
        { mark: { type: "point", filled: true, size: 120 }, encoding: { y: { field: "arm", type: "nominal" }, x: { field: "mean", type: "quantitative" }, color: { ...color, legend: null } } },
      ],
    } as VisualizationSpec,
    effects: {
      $schema: "https://vega.github.io/schema/vega-lite/v6.json",
      width,
      height: 40 * Math.max(1, d.effects.length),
      data: { values: d.effects },
      layer: [
        { mark: { type: "rule", strokeWidth: 3, color: CHART_COLORS.ink }, encoding: { y: { field: "pair", type: "nominal", title: null }, x: { field: "lower", type: "quantitative", title: "Effect size (standardized)" }, x2: { field: "upper" } } },
        { mark: { type: "point", filled: true, size: 120, color: CHART_COLORS.ink }, encoding: { y: { field: "pair", type: "nominal" }, x: { field: "estimate", type: "quantitative" } } },
        { data: { values: [{ z: 0 }] }, mark: { type: "rule", color: CHART_COLORS.graphite, strokeDash: [4, 4] }, encoding: { x: { field: "z", type: "quantitative" } } },
      ],
    } as VisualizationSpec,
    survival: survivalSpec(d),
  };
}

function survivalSpec(d: ChartData): VisualizationSpec {
  const arms = [...new Set(d.survival.map((s) => s.arm))];
  const color = { field: "arm", type: "nominal", title: "Arm" } as const;
  // The number at risk sits under the curves, one row per arm, below S = 0.
  const rowStep = 0.07;
  const bottom = -rowStep * (arms.length + 1);
  const x = { field: "time", type: "quantitative", title: "Cuts", axis: { tickCount: 10 }, ...(d.survivalHorizon ? { scale: { domain: [0, d.survivalHorizon] } } : {}) } as const;
  const y = { type: "quantitative", title: "Share of runs not yet at the threshold", scale: { domain: [bottom, 1] }, axis: { values: [0, 0.25, 0.5, 0.75, 1], format: ".2f" } } as const;
  const atRisk = (d.atRisk ?? []).map((a) => ({ ...a, row: -rowStep * (arms.indexOf(a.arm) + 1.2) }));
  const medians = (d.medians ?? []).filter((m) => m.estimate !== null).map((m) => ({ arm: m.arm, time: m.estimate, half: 0.5, zero: 0 }));
  return {
    $schema: "https://vega.github.io/schema/vega-lite/v6.json",
    width: "container",
    height: 300 + 24 * (arms.length + 1),
    layer: [
      { data: { values: d.survival }, mark: { type: "area", interpolate: "step-after", opacity: 0.18 }, encoding: { x, y: { ...y, field: "lower" }, y2: { field: "upper" }, color } },
      { data: { values: d.survival }, mark: { type: "line", interpolate: "step-after" }, encoding: { x, y: { ...y, field: "survival" }, color: { ...color, legend: { orient: "top", labelLimit: 400 } }, tooltip: [{ field: "arm", title: "Arm" }, { field: "time", title: "Cuts", format: ".1f" }, { field: "survival", title: "Share not yet dull", format: ".3f" }, { field: "atRisk", title: "At risk" }] } },
      ...(d.censorTicks?.length ? [{ data: { values: d.censorTicks }, mark: { type: "tick" as const, orient: "vertical" as const, size: 14, thickness: 2 }, encoding: { x, y: { ...y, field: "survival" }, color, tooltip: [{ field: "arm", title: "Arm" }, { field: "time", title: "Censored at (cuts)" }] } }] : []),
      ...(medians.length ? [{ data: { values: medians }, mark: { type: "rule" as const, strokeDash: [4, 3], strokeWidth: 1.5 }, encoding: { x: { field: "time", type: "quantitative" as const }, y: { field: "zero", type: "quantitative" as const }, y2: { field: "half" }, color } }] : []),
      { data: { values: [{ t: 0, row: -rowStep * 0.35, label: "At risk" }] }, mark: { type: "text", align: "left", fontWeight: "bold" }, encoding: { x: { field: "t", type: "quantitative" }, y: { field: "row", type: "quantitative" }, text: { field: "label" } } },
      ...(atRisk.length ? [{ data: { values: atRisk }, mark: { type: "text" as const }, encoding: { x: { field: "cut", type: "quantitative" as const }, y: { field: "row", type: "quantitative" as const }, text: { field: "n" }, color } }] : []),
    ],
  } as VisualizationSpec;
}
