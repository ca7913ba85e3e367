import { Link } from "react-router";
import type { Route } from "./+types/report";
import { ResultsTables } from "~/components/results-tables.tsx";
import { OutcomeDefinition, SecondaryOutcomes } from "~/components/secondary-outcomes.tsx";
import { closedAnalysis, requireStudyForResults } from "~/server/analysis/access.server.ts";
import { armNames, resultsView } from "~/server/analysis/results.server.ts";
import { reportDetails } from "~/server/analysis/report.server.ts";
import { FlowDiagram, FlowPerArmTable } from "~/components/flow-per-arm.tsx";
import { reasonCategoryLabel } from "~/domain/reason-categories.ts";
import { outcomeLabel } from "~/server/analysis/report-words.ts";
import { reportCharts } from "~/server/analysis/report-charts.server.ts";
import { ReportCharts } from "~/components/report-charts.tsx";
import { formatDateTime } from "~/lib/dates.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Report · ${data?.study.shortName ?? "Study"} · Blindcut` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab, record } = await requireStudyForResults(request, params.labId, params.studyId);
  const analysis = closedAnalysis(record);
  const names = armNames(record);
  const { study } = record;
  return {
    lab,
    study: {
      id: study.id, shortName: study.shortName, question: study.question, hypothesis: study.hypothesis, design: study.design, state: study.state,
      primaryOutcome: study.primaryOutcome, secondaryOutcomes: study.secondaryOutcomes.map(outcomeLabel), plan: study.analysisPlan,
      startedAt: study.startedAt?.toISOString() ?? null, closedAt: study.closedAt?.toISOString() ?? null, unblindedAt: study.unblindedAt?.toISOString() ?? null,
    },
    arms: record.arms.map((a) => ({ label: a.neutralLabel ?? "", name: names?.get(a.neutralLabel ?? "")?.name ?? null, description: names?.get(a.neutralLabel ?? "")?.description ?? null })),
    view: resultsView(analysis, names),
    details: await reportDetails(record),
    charts: await reportCharts(record),
    generatedAt: new Date().toISOString(),
  };
}

export default function Report({ loaderData }: Route.ComponentProps) {
  const { lab, study, arms, view, details } = loaderData;
  const r = details.randomization;
  // Every time in the lab's time zone, the zone named beside it.
  const day = (iso: string | null) => (iso ? formatDateTime(iso, lab.timeZone) : "—");
  return (
    <article className="report mx-auto max-w-4xl print:max-w-none">
      <p className="mb-4 print:hidden">
        <Link to={`/labs/${lab.id}/studies/${study.id}/results`}>← Back to the results</Link> ·{" "}
        <button type="button" onClick={() => window.print()} className="font-bold text-ink underline">Print or save as PDF</button>
      </p>
      <header className="border-b-2 border-graphite-800 pb-3">
        <p className="text-sm font-bold tracking-widest text-graphite-600">BLINDCUT STUDY REPORT</p>
        <h1 className="text-3xl font-bold">{study.shortName}</h1>
        <p className="mt-1 text-graphite-600">
          {lab.name} · {study.state === "unblinded" ? `unblinded ${day(study.unblindedAt)}` : "blinded"} · closed {day(study.closedAt)} · report generated {day(loaderData.generatedAt)}
        </p>
      </header>

      <Section title="Question and hypothesis">
        <p><strong>Question.</strong> {study.question}</p>
        <p className="mt-1"><strong>Hypothesis.</strong> {study.hypothesis || "—"}</p>
        <p className="mt-1"><strong>Primary outcome.</strong> {view.outcome.label} ({view.outcome.unit}). Secondary: {study.secondaryOutcomes.join(", ") || "none"} (each analysed below in its own section, read as supportive).</p>
        <OutcomeDefinition outcome={view.outcome} />
        <p className="mt-1"><strong>Analysis plan.</strong> alpha {study.plan?.alpha ?? "—"}, comparisons {study.plan?.comparisons === "vs_reference" ? "each arm against the reference" : "every pair"}, Holm's adjustment.</p>
      </Section>

      <Section title="Protocol">
        {details.protocol ? (
          <>
            <p>{details.protocol.name}, version {details.protocol.version}. {details.protocol.stopRule} Replicates per blade: {details.protocol.replicates}.</p>
            <p className="mt-1 text-sm">Content hash (SHA-256): <code className="break-all">{details.protocol.hash}</code></p>
          </>
        ) : <p>—</p>}
      </Section>

      <Section title="Design and randomization">
        <p>
          {study.design === "parallel" ? "Parallel arms" : "Within-blade conditions"}: {arms.map((a) => (a.name ? `${a.label} (${a.name}${a.description ? `: ${a.description}` : ""})` : a.label)).join("; ")}.
        </p>
        <p className="mt-1">
          Run order: {r.settings?.method === "permuted_blocks" ? `permuted blocks of ${r.settings.blockSizes.join(" or ")} runs` : "complete randomization"}
          {r.settings?.stratifyByTester ? ", stratified by tester" : ""}; sittings of {r.settings?.sittingLength ?? "—"} runs. Seed <code>{r.seed}</code>, algorithm version {r.algorithmVersion}.
        </p>
        <p className="mt-1" data-testid="seed-source">
          Seed {r.seedSource === "server" ? "drawn by the server (cryptographic random)" : r.seedSource === "typed" ? "typed by the lead" : "of unrecorded source"}.{" "}
          {r.earlierRolls.length === 0 ? "The schedule was rolled once." : `${r.earlierRolls.length} roll(s) before the final one, at ${r.earlierRolls.map(day).join(", ")}; final roll at ${day(r.finalRollAt)}.`}
        </p>
        <p className="mt-1 text-sm">Design hash <code className="break-all">{r.designHash}</code>; schedule hash <code className="break-all">{r.scheduleHash}</code>.</p>
      </Section>

      <Section title="Flow of blades and runs">
        <table className="figures w-full border-collapse text-left" data-testid="flow-table">
          <tbody>
            <Row label="Blades enrolled" value={view.flow.enrolledBlades} />
            <Row label="Runs scheduled" value={view.flow.runs} />
            <Row label="Runs ended at the threshold" value={view.flow.endedAtThreshold} />
            <Row label="Runs censored at the cap" value={view.flow.censored} />
            <Row label="Runs withdrawn" value={view.flow.withdrawn.length} />
            <Row label="Runs analysed" value={view.flow.analysed} />
          </tbody>
        </table>
        {view.flow.withdrawn.length ? (
          <ul className="mt-2 list-disc pl-6">
            {view.flow.withdrawn.map((w) => <li key={w.runId}>{`Blade ${w.bladeKey}${w.armKey ? ` (${w.armKey})` : ""}: ${reasonCategoryLabel(w.category)}${w.afterEnd ? ", after the run had ended" : ""}`}</li>)}
          </ul>
        ) : null}
        <h3 className="mt-3 font-bold">Per {study.design === "within_blade" ? "condition" : "arm"}</h3>
        <FlowPerArmTable flow={view.flow.perArm} design={study.design} />
        <div className="mt-3"><FlowDiagram flow={view.flow.perArm} enrolledBlades={view.flow.enrolledBlades} design={study.design} /></div>
        <p className="mt-2 text-sm" data-testid="notes-rule">
          {details.notes.unblinded
            ? `Leads' notes on withdrawals, reassignments and events were hidden from blinded readers until unblinding (${day(details.notes.unblindedAt)}); they are shown below.`
            : "Leads' notes on withdrawals, reassignments and events are hidden until the study is unblinded; only their categories are shown."}
        </p>
        {details.withdrawalNotes?.length ? (
          <ul className="mt-1 list-disc pl-6" data-testid="withdrawal-notes">
            {details.withdrawalNotes.map((w) => <li key={w.run}>{`Run ${w.run} (blade ${w.bladeCode}), ${reasonCategoryLabel(w.category)}: ${w.note}`}</li>)}
          </ul>
        ) : null}
      </Section>

      <Section title="Withdrawals of ended runs">
        {details.endedRunWithdrawals.length === 0 ? <p>None: no run was withdrawn after it had ended.</p> : (
          <ul className="list-disc pl-6" data-testid="ended-run-withdrawals">
            {details.endedRunWithdrawals.map((w) => (
              <li key={w.run}>{`Run ${w.run} (blade ${w.bladeCode}) had ${w.fromState === "censored" ? "reached the cap" : "ended at the threshold"}; withdrawn by an owner ${day(w.at)}, ${reasonCategoryLabel(w.category)}${w.note ? `: ${w.note}` : ""}`}</li>
            ))}
          </ul>
        )}
      </Section>

      <Section title="Outcomes and comparisons">
        <ResultsTables view={view} />
        <SecondaryOutcomes sections={view.secondary} />
      </Section>

      <ReportCharts charts={loaderData.charts} />

      <Section title="Deviations">
        {details.deviations.length === 0 ? <p>None recorded.</p> : (
          <ul className="list-disc pl-6">
            {details.deviations.map((d, i) => <li key={i}>Run {d.run} (blade {d.bladeCode}), {d.kind}{d.category ? ` (${reasonCategoryLabel(d.category)})` : ""}: {d.noteWithheld ? "note hidden until unblinding" : d.note || "—"} ({day(d.at)})</li>)}
          </ul>
        )}
      </Section>

      <Section title="Instrument calibration">
        <p>
          {details.calibration.runsWithInstrument === 0
            ? "No instrument was recorded for the runs."
            : `${details.calibration.runsOnFlaggedInstrument} of ${details.calibration.runsWithInstrument} runs used an instrument that was flagged (last check failed or past its interval) when the run started.`}
        </p>
      </Section>

      <Section title="Audit summary">
        <table className="w-full border-collapse text-left text-sm">
          <thead>
            <tr className="border-b border-graphite-800"><th scope="col" className="py-1">When</th><th scope="col" className="py-1">What</th><th scope="col" className="py-1">Who</th><th scope="col" className="py-1">Event hash</th></tr>
          </thead>
          <tbody>
            {details.audit.map((a, i) => (
              <tr key={i} className="border-b border-rule"><td className="figures py-1">{day(a.at)}</td><td className="py-1">{a.action}</td><td className="py-1">{a.actor}</td><td className="py-1"><code>{a.hash.slice(0, 16)}…</code></td></tr>
            ))}
          </tbody>
        </table>
        <p className="mt-2 text-sm">Blinded analysis snapshot hash: <code className="break-all">{r.snapshotHash}</code></p>
      </Section>
    </article>
  );
}

function Section({ title, children }: { title: string; children: React.ReactNode }) {
  return (
    <section className="mt-6 break-inside-avoid-page">
      <h2 className="mb-2 border-b border-rule pb-1 text-xl font-bold">{title}</h2>
      {children}
    </section>
  );
}

function Row({ label, value }: { label: string; value: number }) {
  return (
    <tr className="border-b border-rule">
      <th scope="row" className="py-1 pr-4 font-normal">{label}</th>
      <td className="py-1 font-bold">{value}</td>
    </tr>
  );
}
