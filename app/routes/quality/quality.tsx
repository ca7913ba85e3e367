import { Form, data } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/quality";
import { FormAlert, PageTitle, SelectField, SubmitButton } from "~/components/form.tsx";
import { EmptyState } from "~/components/table.tsx";
import { VegaChart, CHART_COLORS } from "~/components/vega-chart.tsx";
import { MANAGERS, requireLabRole } from "~/server/access.server.ts";
import { readFormData } from "~/server/form-data.server.ts";
import { BASELINE_RUNS, QualityError, markReferenceBlade, qualityOverview, referenceFormOptions } from "~/server/quality.server.ts";
import type { ReferenceChart } from "~/server/quality.server.ts";
import { SIGNAL_RULES } from "~/domain/quality/index.ts";

export const meta: Route.MetaFunction = () => [{ title: "Quality · Blindcut" }];

const READERS = ["owner", "lead", "analyst"] as const;

const MarkInput = z.object({
  bladeId: z.string().uuid({ message: "Choose a blade." }),
  protocolVersionId: z.string().uuid({ message: "Choose the protocol version the reference is cut under." }),
});

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab, role } = await requireLabRole(request, params.labId, READERS);
  const [references, options] = await Promise.all([qualityOverview(lab.id), MANAGERS.includes(role) ? referenceFormOptions(lab.id) : null]);
  const canManage = MANAGERS.includes(role);
  // Analysts know a reference by its blind code only: no inventory number or steel reaches them.
  const shown = canManage ? references : references.map((r) => ({ ...r, inventory: "", steel: "" }));
  return { lab, canManage, references: shown, options, baselineRuns: BASELINE_RUNS };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { lab, user } = await requireLabRole(request, params.labId, MANAGERS);
  const form = await readFormData(request);
  const parsed = MarkInput.safeParse(Object.fromEntries(form));
  if (!parsed.success) return data({ error: parsed.error.issues[0]?.message ?? "Check the form.", done: null }, { status: 400 });
  try {
    await markReferenceBlade(lab.id, user.id, parsed.data);
    return { error: null, done: "Marked as a reference. Its reference runs are assigned from its series." };
  } catch (error) {
    if (error instanceof QualityError) return data({ error: error.message, done: null }, { status: error.status });
    throw error;
  }
}

const SHAPES = ["circle", "square", "triangle-up", "diamond", "cross", "triangle-down"];

function chartSpec(chart: ReferenceChart, by: "lot" | "instrument" | "tester") {
  const ind = chart.individuals;
  const flagged = new Map<number, string[]>();
  for (const s of ind.signals) flagged.set(s.index, [...(flagged.get(s.index) ?? []), SIGNAL_RULES[s.rule].name]);
  const values = chart.points.map((p, i) => ({
    n: i + 1,
    value: chart.outcome === "cuts_to_threshold" ? p.cutsToThreshold : p.baseline,
    at: p.at.slice(0, 10),
    lot: p.lot,
    instrument: p.instrument,
    tester: p.tester,
    signal: flagged.get(i)?.join("; ") ?? "",
  }));
  const rules = ind.status === "limits" ? [
    { y: ind.limits.centre, kind: "centre" },
    { y: ind.limits.upper, kind: "upper limit" },
    { y: ind.limits.lower, kind: "lower limit" },
  ] : [];
  return {
    width: "container",
    height: 260,
    layer: [
      { data: { values }, mark: { type: "line", color: CHART_COLORS.rule }, encoding: { x: { field: "n", type: "quantitative", title: "Reference run (time order)" }, y: { field: "value", type: "quantitative", title: `${chart.label} (${chart.unit})`, scale: { zero: false } } } },
      { data: { values }, mark: { type: "point", filled: true, size: 70 }, encoding: { x: { field: "n", type: "quantitative" }, y: { field: "value", type: "quantitative" }, shape: { field: by, type: "nominal", scale: { range: SHAPES }, title: by === "lot" ? "Media lot" : by === "instrument" ? "Instrument" : "Tester" }, tooltip: [{ field: "at" }, { field: "lot" }, { field: "instrument" }, { field: "tester" }, { field: "value" }, { field: "signal" }] } },
      { data: { values: values.filter((v) => v.signal) }, mark: { type: "point", size: 260, strokeWidth: 2, color: CHART_COLORS.signal }, encoding: { x: { field: "n", type: "quantitative" }, y: { field: "value", type: "quantitative" } } },
      ...(rules.length ? [{ data: { values: rules }, mark: { type: "rule", strokeDash: [4, 4], color: CHART_COLORS.graphite }, encoding: { y: { field: "y", type: "quantitative" } } }] : []),
    ],
  };
}

function ewmaSpec(chart: ReferenceChart) {
  const values = (chart.ewma?.points ?? []).map((p, i) => ({ n: i + 1, z: p.z, lower: p.lower, upper: p.upper, signal: chart.ewma!.signals.some((s) => s.index === i) }));
  return {
    width: "container",
    height: 260,
    data: { values },
    layer: [
      { mark: { type: "area", opacity: 0.15, color: CHART_COLORS.ink }, encoding: { x: { field: "n", type: "quantitative", title: "Reference run (time order)" }, y: { field: "lower", type: "quantitative", title: `EWMA of ${chart.label.toLowerCase()} (${chart.unit})`, scale: { zero: false } }, y2: { field: "upper" } } },
      { mark: { type: "line", point: true, color: CHART_COLORS.ink }, encoding: { x: { field: "n", type: "quantitative" }, y: { field: "z", type: "quantitative" } } },
      { transform: [{ filter: "datum.signal" }], mark: { type: "point", size: 260, strokeWidth: 2, color: CHART_COLORS.signal }, encoding: { x: { field: "n", type: "quantitative" }, y: { field: "z", type: "quantitative" } } },
    ],
  };
}

export default function Quality({ loaderData, actionData }: Route.ComponentProps) {
  const { references, options, canManage, baselineRuns } = loaderData;
  return (
    <div>
      <PageTitle lead={`Reference blades cut under a fixed protocol at intervals and on every new lot. Each chart's centre and limits come from the first ${baselineRuns} reference runs (the baseline period); sigma is the average moving range / 1.128 (Montgomery, Introduction to Statistical Quality Control, section 6.4). Several rules are checked at once, so an in-control process flags now and then: a flag is a prompt to look, not a verdict.`}>
        The lab's quality
      </PageTitle>
      <FormAlert message={actionData?.error ?? undefined} />
      <FormAlert tone="ok" message={actionData?.done ?? undefined} />
      {references.length ? (
        <p className="mb-4">
          <a href={`/labs/${loaderData.lab.id}/quality/reference-readings.csv`} download data-testid="reference-csv">
            Download the readings of every reference run (CSV)
          </a>
        </p>
      ) : null}
      {references.length === 0 ? (
        <EmptyState title="No reference blade yet">Mark a blade of a known steel and heat treatment as a reference, with the protocol version it is cut under.</EmptyState>
      ) : (
        references.map((ref) => (
          <section key={ref.id} className="mb-10" data-testid="reference">
            <h2 className="text-2xl font-bold">Reference {ref.code}{ref.inventory ? ` · ${ref.inventory} · ${ref.steel}` : ""}</h2>
            <p>Cut under {ref.protocolName} v{ref.version}. {ref.runs} reference runs; reference runs are not blinded.</p>
            {ref.charts.map((chart) => (
              <div key={chart.outcome} className="mt-4" data-testid={`chart-${chart.outcome}`}>
                <h3 className="text-xl font-bold">{chart.label}</h3>
                {chart.individuals.status === "no-limits" ? (
                  <p data-testid="no-limits">{chart.individuals.reason} ({chart.points.length} runs shown.)</p>
                ) : (
                  <p className="figures">
                    Centre {chart.individuals.limits.centre.toFixed(1)} {chart.unit}, limits {chart.individuals.limits.lower.toFixed(1)} to {chart.individuals.limits.upper.toFixed(1)} {chart.unit}, sigma {chart.individuals.limits.sigma.toFixed(2)} {chart.unit}; n = {chart.points.length} runs of 1 blade
                    {chart.outcome === "cuts_to_threshold" && chart.points.some((p) => p.censored) ? "; censored runs are drawn at their cap (a lower bound)" : ""}.
                  </p>
                )}
                <ul data-testid="signals" className="my-2">
                  {[...chart.individuals.signals, ...(chart.ewma?.signals ?? [])].map((s) => {
                    const p = chart.points[s.index];
                    return (
                      <li key={`${s.rule}-${s.index}`} className="text-fault">
                        Signal: {SIGNAL_RULES[s.rule].name} at run {s.index + 1} ({p.at.slice(0, 10)}, lot {p.lot}, {p.instrument}, {p.tester}) — {SIGNAL_RULES[s.rule].reference}
                      </li>
                    );
                  })}
                </ul>
                <div className="grid gap-4 md:grid-cols-2">
                  <VegaChart
                    spec={chartSpec(chart, "lot") as never}
                    title={`Individuals chart: ${chart.label}`}
                    description={`${chart.label} of each reference run in time order, shaped by media lot, with centre line and 3-sigma limits.`}
                    testId={`individuals-${chart.outcome}`}
                    table={{ caption: `${chart.label} per reference run`, columns: [{ key: "at", label: "Date" }, { key: "lot", label: "Lot" }, { key: "instrument", label: "Instrument" }, { key: "tester", label: "Tester" }, { key: "value", label: chart.unit, numeric: true }], rows: chart.points.map((p) => ({ ...p, at: p.at.slice(0, 10), value: chart.outcome === "cuts_to_threshold" ? p.cutsToThreshold : p.baseline })) }}
                  />
                  {chart.ewma ? (
                    <VegaChart
                      spec={ewmaSpec(chart) as never}
                      title={`EWMA chart: ${chart.label}`}
                      description={`Exponentially weighted moving average (lambda ${chart.ewma.lambda}, L ${chart.ewma.L}) with its exact limits (Montgomery, section 9.2).`}
                      testId={`ewma-${chart.outcome}`}
                      table={{ caption: "EWMA per reference run", columns: [{ key: "n", label: "Run", numeric: true }, { key: "z", label: "EWMA", numeric: true }, { key: "lower", label: "Lower", numeric: true }, { key: "upper", label: "Upper", numeric: true }], rows: chart.ewma.points.map((p, i) => ({ n: i + 1, z: p.z.toFixed(2), lower: p.lower.toFixed(2), upper: p.upper.toFixed(2) })) }}
                    />
                  ) : null}
                </div>
              </div>
            ))}
          </section>
        ))
      )}
      {canManage && options ? (
        <section className="mt-8 max-w-xl">
          <h2 className="text-2xl font-bold">Mark a reference blade</h2>
          <Form method="post" className="flex flex-col gap-3">
            <SelectField label="Blade" name="bladeId" options={options.blades.map((b) => ({ value: b.id, label: `${b.inventory} · ${b.steel}` }))} />
            <SelectField label="Protocol version" name="protocolVersionId" options={[{ value: "", label: "Choose…" }, ...options.versions.map((v) => ({ value: v.id, label: `${v.name} v${v.version}` }))]} />
            <SubmitButton>Mark as reference</SubmitButton>
          </Form>
        </section>
      ) : null}
    </div>
  );
}
