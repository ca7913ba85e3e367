import { useMemo } from "react";
import type { VisualizationSpec } from "vega-embed";
import { CHART_COLORS, VegaChart, type ChartTable } from "./vega-chart.tsx";

export type PowerCurvePoint = { n: number; power: number };

type Props = {
  curve: PowerCurvePoint[];
  /** The proposed n and the power it achieves. */
  proposed: PowerCurvePoint;
  target: number;
  /** What n counts: "blades per arm" or "blades". */
  counted: string;
  description: string;
};

export const percent = (p: number, digits = 1) => `${(p * 100).toFixed(digits)} %`;

/** Power against n: the curve in ink, the target power as a signal-coloured rule, the proposed n as a labelled point. */
export function PowerCurveChart({ curve, proposed, target, counted, description }: Props) {
  const spec = useMemo(() => powerCurveSpec({ curve, proposed, target, counted, description }), [curve, proposed, target, counted, description]);
  const table: ChartTable = useMemo(
    () => ({
      caption: `Power of the test at each number of ${counted}; the proposed n is marked.`,
      columns: [
        { key: "n", label: counted[0].toUpperCase() + counted.slice(1), numeric: true },
        { key: "power", label: "Power", numeric: true, format: (v) => percent(Number(v)) },
        { key: "mark", label: "Note", format: (v) => (v ? String(v) : "") },
      ],
      rows: curve.map((p) => ({ ...p, mark: p.n === proposed.n ? "◀ proposed" : "" })),
    }),
    [curve, proposed.n, counted],
  );
  return <VegaChart spec={spec} title={`Power against the number of ${counted}`} description={description} table={table} testId="power-chart" />;
}

/** Builds the Vega-Lite spec in the client from the loader's numbers. */
export function powerCurveSpec({ curve, proposed, target, counted, description }: Props): VisualizationSpec {
  const lastN = curve[curve.length - 1]?.n ?? proposed.n;
  const nTitle = counted[0].toUpperCase() + counted.slice(1);
  const midRise = curve.find((p) => p.power >= 0.5) ?? proposed;
  return {
    $schema: "https://vega.github.io/schema/vega-lite/v6.json",
    description,
    width: "container",
    height: 300,
    autosize: { type: "fit-x", contains: "padding" },
    layer: [
      {
        data: { values: curve },
        mark: { type: "line", color: CHART_COLORS.ink, interpolate: "monotone", strokeWidth: 3 },
        encoding: {
          x: { field: "n", type: "quantitative", title: nTitle, scale: { domain: [0, lastN], nice: false }, axis: { tickMinStep: 1, format: "d" } },
          y: { field: "power", type: "quantitative", title: "Power", scale: { domain: [0, 1] }, axis: { format: ".0%", values: [0, 0.2, 0.4, 0.6, 0.8, 1] } },
          tooltip: [
            { field: "n", type: "quantitative", title: nTitle },
            { field: "power", type: "quantitative", title: "Power", format: ".1%" },
          ],
        },
      },
      // Direct label on the line instead of a legend, in the empty space right of its rise.
      {
        data: { values: [midRise] },
        mark: { type: "text", align: "left", baseline: "top", dx: 12, color: CHART_COLORS.ink, fontWeight: "bold" },
        encoding: { x: { field: "n", type: "quantitative" }, y: { field: "power", type: "quantitative" }, text: { value: "Power of the test" } },
      },
      {
        data: { values: [{ power: target }] },
        mark: { type: "rule", color: CHART_COLORS.signal, strokeDash: [6, 4], strokeWidth: 2 },
        encoding: { y: { field: "power", type: "quantitative" } },
      },
      {
        data: { values: [{ power: target, n: lastN }] },
        // Below the rule at the right end, where the curve has already passed the target.
        mark: { type: "text", align: "right", baseline: "top", dy: 6, color: CHART_COLORS.signal, fontWeight: "bold" },
        encoding: {
          x: { field: "n", type: "quantitative" },
          y: { field: "power", type: "quantitative" },
          text: { value: `Target power ${percent(target, 0)}` },
        },
      },
      {
        data: { values: [proposed] },
        mark: { type: "point", filled: true, size: 140, color: CHART_COLORS.ink, stroke: CHART_COLORS.paper, strokeWidth: 2, opacity: 1 },
        encoding: { x: { field: "n", type: "quantitative" }, y: { field: "power", type: "quantitative" } },
      },
      {
        data: { values: [proposed] },
        mark: { type: "text", align: "left", baseline: "top", dx: 10, dy: 6, color: CHART_COLORS.ink, fontWeight: "bold" },
        encoding: {
          x: { field: "n", type: "quantitative" },
          y: { field: "power", type: "quantitative" },
          text: { value: `${proposed.n} ${counted}: ${percent(proposed.power)}` },
        },
      },
    ],
  } as VisualizationSpec;
}
