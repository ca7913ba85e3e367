import { useEffect, useId, useRef, useState, type ReactNode } from "react";
// Types only: erased at build time, so no vega code reaches a bundle from here.
import type { VisualizationSpec } from "vega-embed";

/**
 * Blindcut's chart palette and look. Okabe–Ito colours (Okabe & Ito 2008, "Color
 * Universal Design"), led by the app's ink; the signal colour is kept for
 * thresholds and targets and is not in the category range.
 */
export const CHART_COLORS = {
  ink: "#1f4e6b",
  signal: "#a8430d",
  graphite: "#4d535a",
  rule: "#d6d1c4",
  paper: "#fffdf8",
} as const;

/** Okabe–Ito, ink first in place of its black; orange (#E69F00) sits last as it is close to the signal colour. */
export const OKABE_ITO = ["#1f4e6b", "#56B4E9", "#009E73", "#CC79A7", "#0072B2", "#D55E00", "#F0E442", "#E69F00"];

export const CHART_FONT = "Atkinson Hyperlegible, ui-sans-serif, system-ui, sans-serif";

/** Vega-Lite config shared by every Blindcut chart. */
export const chartConfig = {
  font: CHART_FONT,
  background: CHART_COLORS.paper,
  // The wrapper carries the chart's name and description; marks need no ARIA of their own.
  aria: false,
  view: { stroke: null },
  range: { category: OKABE_ITO },
  axis: {
    labelColor: CHART_COLORS.graphite,
    titleColor: "#17191b",
    gridColor: CHART_COLORS.rule,
    domainColor: CHART_COLORS.graphite,
    tickColor: CHART_COLORS.graphite,
    labelFontSize: 13,
    titleFontSize: 14,
    titleFontWeight: "bold",
  },
  legend: { labelFontSize: 13, titleFontSize: 14 },
  text: { fontSize: 13 },
  line: { strokeWidth: 3 },
} as const;

export type ChartTableColumn = {
  key: string;
  label: string;
  /** How a cell is shown; the raw value is used when missing. */
  format?: (value: unknown) => string;
  numeric?: boolean;
};

export type ChartTable = {
  caption: string;
  columns: ChartTableColumn[];
  rows: Record<string, unknown>[];
};

type Props = {
  /** A Vega-Lite spec built in the client (never passed through loader data). */
  spec: VisualizationSpec;
  /** Short name of the chart, read by screen readers and shown as the heading. */
  title: string;
  /** What the chart shows, in words, for people who cannot see it. */
  description: string;
  /** The chart's numbers: every chart has a table view. */
  table: ChartTable;
  testId?: string;
  /** Height of the chart area in px, kept while loading so the page does not jump. */
  height?: number;
  /** Caveats and figures shown under the chart in both views (rules, warnings, medians). */
  notes?: ReactNode;
  /** Further tables of the table view, after the main one. */
  moreTables?: ChartTable[];
};

type State = { kind: "loading" } | { kind: "ready" } | { kind: "error"; message: string };

/**
 * Renders a Vega-Lite spec with vega-embed, loaded by dynamic import in the browser
 * only, so the vega chunk stays off every page that does not chart. Expressions run
 * through vega-interpreter (`ast: true`), so no eval is needed under the CSP.
 */
export function VegaChart({ spec, title, description, table, testId = "vega-chart", height = 320, notes, moreTables = [] }: Props) {
  const target = useRef<HTMLDivElement>(null);
  const [state, setState] = useState<State>({ kind: "loading" });
  const [view, setView] = useState<"chart" | "table">("chart");
  const id = useId();
  const descriptionId = `${id}-description`;
  const tableId = `${id}-table`;

  useEffect(() => {
    let cancelled = false;
    let finalize: (() => void) | undefined;
    setState({ kind: "loading" });
    (async () => {
      try {
        const [{ default: embed }, { expressionInterpreter }] = await Promise.all([import("vega-embed"), import("vega-interpreter")]);
        if (cancelled || !target.current) return;
        const result = await embed(target.current, spec, {
          actions: false,
          renderer: "svg",
          ast: true,
          expr: expressionInterpreter,
          tooltip: true,
          // Blindcut's look; `never` because the config's literal types are narrower than vega-embed's.
          config: chartConfig as never,
        });
        if (cancelled) {
          result.finalize();
          return;
        }
        finalize = () => result.finalize();
        setState({ kind: "ready" });
      } catch (error) {
        if (!cancelled) setState({ kind: "error", message: error instanceof Error ? error.message : String(error) });
      }
    })();
    return () => {
      cancelled = true;
      finalize?.();
    };
  }, [spec]);

  return (
    <figure className="rounded-lg border border-rule bg-card p-4" data-testid={testId} data-chart-state={state.kind}>
      <div className="mb-3 flex flex-wrap items-baseline justify-between gap-3">
        <figcaption className="text-lg font-bold">{title}</figcaption>
        <button
          type="button"
          className="min-h-target rounded border border-graphite-400 bg-card px-3 font-bold text-graphite-950 hover:bg-paper-deep"
          aria-controls={tableId}
          aria-expanded={view === "table"}
          onClick={() => setView((v) => (v === "chart" ? "table" : "chart"))}
        >
          {view === "chart" ? "Show the numbers as a table" : "Show the chart"}
        </button>
      </div>
      <p id={descriptionId} className="sr-only">
        {description}
      </p>
      <div hidden={view !== "chart"}>
        {state.kind === "loading" ? (
          <p role="status" className="flex items-center justify-center text-graphite-600" style={{ minHeight: height }}>
            Drawing the chart…
          </p>
        ) : null}
        {state.kind === "error" ? (
          <div role="alert" className="rounded border-l-4 border-fault bg-fault-soft p-3">
            <p className="font-bold text-fault">The chart could not be drawn.</p>
            <p className="text-sm text-graphite-800">{state.message}</p>
            <p className="text-sm text-graphite-800">Its numbers are in the table view.</p>
          </div>
        ) : null}
        {/* Vega sets its own role and label on the element it draws into, so the accessible name sits on a wrapper. */}
        <div role="img" aria-label={title} aria-describedby={descriptionId} data-testid={`${testId}-canvas`}>
          {/* Vega's marks carry no names of their own: the wrapper's name and description stand for the picture, the table for its numbers. */}
          <div ref={target} className="w-full" aria-hidden="true" />
        </div>
      </div>
      {/* It scrolls on its own: focusable, so keyboard users can scroll it too. */}
      <div id={tableId} hidden={view !== "table"} className="max-h-96 overflow-y-auto" tabIndex={0} role="region" aria-label={`${title}: the numbers`}>
        {[table, ...moreTables].map((t) => (
          <table key={t.caption} className="figures mb-4 w-full border-collapse text-left">
            <caption className="mb-2 text-left text-sm text-graphite-600">{t.caption}</caption>
            <thead className="sticky top-0 bg-card">
              <tr className="border-b-2 border-graphite-800">
                {t.columns.map((c) => (
                  <th key={c.key} scope="col" className={`py-2 pr-4 ${c.numeric ? "text-right" : ""}`}>
                    {c.label}
                  </th>
                ))}
              </tr>
            </thead>
            <tbody>
              {t.rows.map((row, i) => (
                <tr key={i} className="border-b border-rule">
                  {t.columns.map((c, j) => {
                    const Cell = j === 0 ? "th" : "td";
                    return (
                      <Cell key={c.key} scope={j === 0 ? "row" : undefined} className={`py-1 pr-4 ${j === 0 ? "font-normal" : ""} ${c.numeric ? "text-right" : ""}`}>
                        {c.format ? c.format(row[c.key]) : String(row[c.key] ?? "")}
                      </Cell>
                    );
                  })}
                </tr>
              ))}
            </tbody>
          </table>
        ))}
      </div>
      {notes ? <div className="mt-3 grid gap-1 text-sm text-graphite-800">{notes}</div> : null}
    </figure>
  );
}
