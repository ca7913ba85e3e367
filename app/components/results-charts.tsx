import { useEffect, useMemo, useState } from "react";
import type { VisualizationSpec } from "vega-embed";
import { VegaChart, CHART_COLORS } from "./vega-chart.tsx";

type ChartData = {
  outcome: { label: string; unit: string; key: string };
  runCurves: { run: string; arm: string; cut: number; aggregate: number }[];
  armCurves: { arm: string; cut: number; mean: number; n: number }[];
  armIntervals: { arm: string; mean: number; lower: number | null; upper: number | null; bootLower: number | null; bootUpper: number | null; nBlades: number }[];
  effects: { pair: string; estimate: number; lower: number; upper: number; measure: string }[];
  survival: { arm: string; time: number; survival: number; lower: number; upper: number }[];
};

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
          description={`Sharpness reading (gf) against cuts for every run, thin lines, and each arm's mean curve, thick lines${threshold ? `, with the threshold at ${threshold} gf` : ""}.`}
          table={{ caption: "Arm mean curve: mean aggregate reading at each cut", columns: [{ key: "arm", label: "Arm" }, { key: "cut", label: "Cut", numeric: true }, { key: "mean", label: "Mean (gf)", numeric: true, format: num(1) }, { key: "n", label: "Runs", numeric: true }], rows: d.armCurves }}
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
        />
      ) : null}
      {d.survival.length ? (
        <VegaChart
          testId="chart-survival"
          spec={specs!.survival}
          title="Runs still above the stop mark (Kaplan–Meier)"
          description="Share of runs that have not yet reached the threshold against cuts, per arm, as Kaplan–Meier step curves; censored runs count until the cap."
          table={{ caption: "Kaplan–Meier estimate per arm", columns: [{ key: "arm", label: "Arm" }, { key: "time", label: "Cuts", numeric: true, format: num(2) }, { key: "survival", label: "Share not yet dull", numeric: true, format: num(3) }, { key: "lower", label: "Lower", numeric: true, format: num(3) }, { key: "upper", label: "Upper", numeric: true, format: num(3) }], rows: d.survival }}
        />
      ) : null}
    </div>
  );
}

function buildSpecs(d: ChartData, threshold: number | null): Record<"curves" | "intervals" | "effects" | "survival", VisualizationSpec> {
  const width = "container" as const;
  const color = { field: "arm", type: "nominal", title: "Arm" } as const;
  return {
    curves: {
      $schema: "https://vega.github.io/schema/vega-lite/v6.json",
      width,
      height: 300,
      layer: [
        { data: { values: d.runCurves }, mark: { type: "line", strokeWidth: 1, opacity: 0.35 }, encoding: { x: { field: "cut", type: "quantitative", title: "Cuts" }, y: { field: "aggregate", type: "quantitative", title: "Reading (gf)" }, detail: { field: "run" }, color } },
        { data: { values: d.armCurves }, mark: { type: "line", strokeWidth: 4 }, encoding: { x: { field: "cut", type: "quantitative" }, y: { field: "mean", type: "quantitative" }, color } },
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
    survival: {
      $schema: "https://vega.github.io/schema/vega-lite/v6.json",
      width,
      height: 300,
      data: { values: d.survival },
      mark: { type: "line", interpolate: "step-after" },
      encoding: { x: { field: "time", type: "quantitative", title: "Cuts" }, y: { field: "survival", type: "quantitative", title: "Share of runs not yet at the threshold", scale: { domain: [0, 1] } }, color },
    } as VisualizationSpec,
  };
}
