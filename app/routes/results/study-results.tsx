import { Form, Link } from "react-router";
import { StudyStateBadge } from "~/components/study-state.tsx";
import { useLabDates } from "~/lib/use-lab-dates.ts";
import { studyLifecycleAction } from "~/server/analysis/lifecycle-action.server.ts";
import type { Route } from "./+types/study-results";
import { FormAlert, PageTitle, SubmitButton } from "~/components/form.tsx";
import { ResultsCharts } from "~/components/results-charts.tsx";
import { ResultsTables } from "~/components/results-tables.tsx";
import { FlowPerArmTable } from "~/components/flow-per-arm.tsx";
import { OutcomeDefinition, SecondaryOutcomes } from "~/components/secondary-outcomes.tsx";
import { closedAnalysis, requireStudySummaryForResults } from "~/server/analysis/access.server.ts";
import { armNames, resultsView } from "~/server/analysis/results.server.ts";
import type { ProtocolContent } from "~/domain/protocol.ts";
import { QualityNotices } from "~/components/quality/quality-notices.tsx";
import { qualityNoticesForStudy } from "~/server/quality.server.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Results · ${data?.study.shortName ?? "Study"} · Blindcut` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  // The tables need no per-run outcomes (the charts fetch them from analysis.json).
  const { lab, role, record } = await requireStudySummaryForResults(request, params.labId, params.studyId, { perRunAnalysis: false });
  const { study } = record;
  const closed = study.state === "closed" || study.state === "unblinded";
  const base = {
    lab,
    role,
    study: { id: study.id, shortName: study.shortName, question: study.question, hypothesis: study.hypothesis, state: study.state, closedAt: study.closedAt?.toISOString() ?? null, unblindedAt: study.unblindedAt?.toISOString() ?? null, snapshotHash: study.snapshotHash },
    threshold: (record.protocol?.content as ProtocolContent | undefined)?.edgeForce?.thresholdGf ?? null,
    qualityNotices: await qualityNoticesForStudy(lab.id, study.id),
  };
  if (!closed) {
    // While the study runs nobody sees outcomes: only how many runs are done.
    const done = record.runs.filter((r) => r.state !== "waiting" && r.state !== "in_progress").length;
    return { ...base, closed: false as const, progress: { done, total: record.runs.length }, view: null };
  }
  return { ...base, closed: true as const, progress: null, view: resultsView(closedAnalysis(record), armNames(record)) };
}

export function action({ request, params }: Route.ActionArgs) {
  return studyLifecycleAction(request, params, "close", (form) => form.get("intent") === "close", "Unknown action");
}


export default function StudyResults({ loaderData, actionData }: Route.ComponentProps) {
  const { formatDateTime } = useLabDates();
  const { lab, study, role, view } = loaderData;
  const manager = role === "owner" || role === "lead";
  const base = `/labs/${lab.id}/studies/${study.id}`;
  return (
    <div>
      <PageTitle lead={study.question}>
        Results: {study.shortName} <span className="ml-2 align-middle text-base" data-testid="study-state"><StudyStateBadge state={study.state} /></span>
      </PageTitle>
      <FormAlert message={actionData?.error} />
      <QualityNotices labId={lab.id} notices={loaderData.qualityNotices} />
      {!loaderData.closed ? (
        <section className="rounded-lg border border-rule bg-card p-5">
          <p className="text-lg">
            <span className="figures font-bold">{loaderData.progress.done}</span> of <span className="figures font-bold">{loaderData.progress.total}</span> runs have ended or been withdrawn.
          </p>
          <p className="mt-2 text-graphite-800">Results are read after the study is closed. Nobody sees outcomes by arm while it runs.</p>
          {manager && study.state === "running" ? (
            <Form method="post" className="mt-4">
              <p className="mb-3 max-w-prose">
                Closing ends the study for good: the database refuses new readings, corrections and run changes, and a blinded analysis snapshot is taken
                and hashed. Analysts are e-mailed.
              </p>
              <SubmitButton intent="close">Close the study</SubmitButton>
            </Form>
          ) : null}
        </section>
      ) : (
        <>
          <section aria-label="Blinding" className="mb-6 rounded border-l-4 border-ink bg-card p-4">
            {study.state === "closed" ? (
              <p>
                <strong>Blinded.</strong> Arms are shown under neutral names until a lead unblinds the study.
                {manager ? (
                  <>
                    {" "}
                    <Link to={`${base}/results/unblind`} className="font-bold">Unblind…</Link>
                  </>
                ) : null}
              </p>
            ) : (
              <p data-testid="unblinded-note">
                <strong>Unblinded</strong> on {formatDateTime(study.unblindedAt!)}. The analysis was done blind: it was taken when the study closed on{" "}
                {formatDateTime(study.closedAt!)}, before anyone saw the arm names, and is unchanged since (snapshot hash <code className="break-all text-xs">{study.snapshotHash}</code>).
              </p>
            )}
          </section>
          <OutcomeDefinition outcome={view!.outcome} />
          <ResultsTables view={view!} />
          <section className="mt-8" aria-labelledby="flow-per-arm">
            <h2 id="flow-per-arm" className="mb-2 text-xl font-bold">Flow of blades and runs per {view!.design === "within_blade" ? "condition" : "arm"}</h2>
            <FlowPerArmTable flow={view!.flow.perArm} design={view!.design} />
          </section>
          <SecondaryOutcomes sections={view!.secondary} />
          <h2 className="mb-3 mt-8 text-xl font-bold">Charts</h2>
          <ResultsCharts url={`/labs/${lab.id}/api/studies/${study.id}/analysis.json`} threshold={loaderData.threshold} />
          <section className="mt-8" aria-labelledby="exports">
            <h2 id="exports" className="mb-2 text-xl font-bold">Report and exports</h2>
            <ul className="flex flex-wrap gap-3">
              <li><Link to={`${base}/report`} className="inline-flex min-h-target items-center rounded border border-graphite-800 px-4 font-bold text-graphite-950 no-underline">Study report (print)</Link></li>
              <li><a href={`/labs/${lab.id}/api/studies/${study.id}/readings.csv`} className="inline-flex min-h-target items-center rounded border border-graphite-800 px-4 font-bold text-graphite-950 no-underline">Raw readings (CSV)</a></li>
              <li><a href={`/labs/${lab.id}/api/studies/${study.id}/outcomes.csv`} className="inline-flex min-h-target items-center rounded border border-graphite-800 px-4 font-bold text-graphite-950 no-underline">Per-run outcomes (CSV)</a></li>
              <li><a href={`/labs/${lab.id}/api/studies/${study.id}/bundle.json`} className="inline-flex min-h-target items-center rounded border border-graphite-800 px-4 font-bold text-graphite-950 no-underline">Reproducibility bundle (JSON)</a></li>
            </ul>
          </section>
        </>
      )}
    </div>
  );
}

