// The report's charts, rendered on the server to SVG by Vega's own renderer, from the same
// numbers (chartData) and the same specs (buildSpecs) as the results page, so the printed
// page and the PDF need no client JavaScript.
import * as vega from "vega";
import { compile, type TopLevelSpec } from "vega-lite";
import type { VisualizationSpec } from "vega-embed";
import { buildSpecs, type ChartData } from "~/components/results-charts.tsx";
import { chartConfig } from "~/components/vega-chart.tsx";
import { armNames, chartData } from "./results.server.ts";
import { closedAnalysis } from "./access.server.ts";
import type { ProtocolContent } from "~/domain/protocol.ts";
import type { StudyRecord } from "./study-data.server.ts";

export type ReportChart = { id: string; title: string; description: string; svg: string };

// A printed A4 column at 96 dpi, less margins and the axis labels.
const PRINT_WIDTH = 560;

export async function renderChartSvg(spec: VisualizationSpec): Promise<string> {
  const sized = { ...(spec as Record<string, unknown>), width: PRINT_WIDTH, config: chartConfig } as unknown as TopLevelSpec;
  const compiled = compile(sized).spec;
  const view = new vega.View(vega.parse(compiled), { renderer: "none" });
  try {
    // The figure around the SVG names and describes the chart: the SVG's own mark roles go,
    // and the SVG is hidden from assistive technology (its numbers are in the report's tables).
    const svg = await view.toSVG();
    return svg.replace(/\s(?:role|aria-[a-z]+)="[^"]*"/g, "").replace(/^<svg/, '<svg aria-hidden="true" focusable="false"');
  } finally {
    view.finalize();
  }
}


/** Every chart the results page draws, in its order, as SVG strings. */
export async function reportCharts(record: StudyRecord): Promise<ReportChart[]> {
  const d = chartData(closedAnalysis(record), armNames(record)) as ChartData;
  const threshold = (record.protocol?.content as ProtocolContent | undefined)?.edgeForce?.thresholdGf ?? null;
  const specs = buildSpecs(d, threshold);
  const wanted: { id: keyof typeof specs; title: string; description: string; show: boolean }[] = [
    { id: "curves", title: "Sharpness curves", description: `Reading (gf) against cuts for every run and each arm's mean curve${threshold ? `; threshold ${threshold} gf (dashed)` : ""}.`, show: d.runCurves.length > 0 },
    { id: "intervals", title: `${d.outcome.label} by arm`, description: `Mean with 95 % interval (${d.outcome.unit}) per arm.`, show: d.armIntervals.length > 0 },
    { id: "effects", title: "Effect sizes", description: "Standardized difference with 95 % interval for each comparison; 0 means no difference.", show: d.effects.length > 0 },
    { id: "survival", title: "Runs not yet at the threshold", description: "Kaplan-Meier share of runs not yet at the threshold against cuts, with 95 % band, censored runs as ticks and the number at risk.", show: d.survival.length > 0 },
  ];
  const out: ReportChart[] = [];
  for (const w of wanted.filter((x) => x.show)) out.push({ id: w.id, title: w.title, description: w.description, svg: await renderChartSvg(specs[w.id]) });
  return out;
}
