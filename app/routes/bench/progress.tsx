import { data, Form, useNavigation } from "react-router";
import { useEffect, useState } from "react";
import type { Route } from "./+types/progress";
import { FormAlert, PageTitle } from "~/components/form.tsx";
import { RunStateBadge } from "~/components/bench/state-badge.tsx";
import { MANAGERS, notFound, requireLabRole, isUuid } from "~/server/access.server.ts";
import { BenchError } from "~/server/bench/api.server.ts";
import { reassignRuns, ReassignInput, studyOfLab, studyProgress, studyTesterChoices, withdrawRun, WithdrawInput } from "~/server/bench/leads.server.ts";
import { parseForm } from "~/lib/forms.ts";
import { readFormData } from "~/server/form-data.server.ts";
import { ReasonCategorySelect } from "~/components/reason-category-select.tsx";
import { QualityNotices } from "~/components/quality/quality-notices.tsx";
import { qualityNoticesForStudy } from "~/server/quality.server.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Progress · ${data?.study.shortName ?? "Study"} · Blindcut` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab, role } = await requireLabRole(request, params.labId, MANAGERS);
  const study = isUuid(params.studyId) ? await studyOfLab(lab.id, params.studyId) : null;
  if (!study) notFound();
  const [progress, testers, qualityNotices] = await Promise.all([studyProgress(lab.id, study.id), studyTesterChoices(lab.id, study.id), qualityNoticesForStudy(lab.id, study.id)]);
  return { labId: lab.id, role, study: { id: study.id, shortName: study.shortName, state: study.state, hasPreparer: !!study.preparerId }, progress, testers, qualityNotices };
}

type Result = { ok: boolean; message?: string; errors: Record<string, string> };

export async function action({ request, params }: Route.ActionArgs) {
  const { lab, user, role } = await requireLabRole(request, params.labId, MANAGERS);
  const study = isUuid(params.studyId) ? await studyOfLab(lab.id, params.studyId) : null;
  if (!study) notFound();
  const form = await readFormData(request);
  const intent = form.get("intent");
  try {
    if (intent === "withdraw") {
      const parsed = parseForm(WithdrawInput, form);
      if (!parsed.ok) return data<Result>({ ok: false, errors: parsed.errors, message: Object.values(parsed.errors)[0] }, { status: 400 });
      await withdrawRun(lab.id, study.id, { id: user.id, role }, parsed.data);
      return data<Result>({ ok: true, errors: {}, message: "The run is withdrawn; its category and note are on the record (the note stays hidden from blinded readers until unblinding)." });
    }
    if (intent === "reassign") {
      const parsed = parseForm(ReassignInput, form);
      if (!parsed.ok) return data<Result>({ ok: false, errors: parsed.errors, message: Object.values(parsed.errors)[0] }, { status: 400 });
      const { moved } = await reassignRuns(lab.id, study.id, user.id, parsed.data);
      return data<Result>({ ok: true, errors: {}, message: `${moved} run(s) reassigned; each is a deviation on the record.` });
    }
    return data<Result>({ ok: false, errors: {}, message: "Unknown action" }, { status: 400 });
  } catch (error) {
    if (error instanceof BenchError) return data<Result>({ ok: false, errors: {}, message: error.message }, { status: error.status });
    throw error;
  }
}

type Progress = Route.ComponentProps["loaderData"]["progress"];

export default function ProgressPage({ loaderData, actionData }: Route.ComponentProps) {
  const { labId, study, testers, role } = loaderData;
  const [progress, setProgress] = useState<Progress>(loaderData.progress);
  const [stale, setStale] = useState(false);
  const navigation = useNavigation();
  useEffect(() => setProgress(loaderData.progress), [loaderData.progress]);
  // Refreshed every few seconds from the JSON route while the page is open.
  useEffect(() => {
    let stop = false;
    const tick = async () => {
      try {
        const res = await fetch(`/labs/${labId}/studies/${study.id}/progress.json`, { headers: { Accept: "application/json" } });
        if (!res.ok) throw new Error(String(res.status));
        const json = (await res.json()) as Progress;
        if (!stop) {
          setProgress(json);
          setStale(false);
        }
      } catch {
        if (!stop) setStale(true);
      }
    };
    const timer = window.setInterval(tick, 5000);
    return () => {
      stop = true;
      window.clearInterval(timer);
    };
  }, [labId, study.id]);
  const result = actionData as Result | undefined;
  const waiting = progress.runs.filter((r) => r.state === "waiting");
  return (
    <div className="flex min-w-0 flex-col gap-6">
      <PageTitle lead="Runs done, in progress and waiting per tester and sitting. No outcomes are shown while the study runs, and nothing by arm.">
        Progress: {study.shortName}
      </PageTitle>
      <p className="text-sm text-graphite-600" aria-live="polite">
        {stale ? "▲ Could not refresh: showing the last figures." : `Refreshed every 5 s · last at ${new Date(progress.at).toLocaleTimeString()}`}
        {study.hasPreparer ? (
          <>
            {" "}· <a href={`/labs/${labId}/studies/${study.id}/preparation`}>Preparation list</a>
          </>
        ) : null}
      </p>
      <FormAlert tone={result?.ok ? "ok" : "fault"} message={navigation.state === "idle" ? result?.message : undefined} />
      <QualityNotices labId={labId} notices={loaderData.qualityNotices} />
      <section className="grid gap-3 sm:grid-cols-4" data-testid="progress-total">
        <Figure label="Done" value={progress.total.done} />
        <Figure label="In progress" value={progress.total.inProgress} />
        <Figure label="Waiting" value={progress.total.waiting} />
        <Figure label="Withdrawn" value={progress.total.withdrawn} />
      </section>
      <section className="overflow-x-auto">
        <table className="w-full border-collapse text-left" data-testid="progress-table">
          <thead>
            <tr className="border-b-2 border-graphite-800">
              <th scope="col" className="py-2 pr-3">Tester</th>
              <th scope="col" className="py-2 pr-3">Sitting</th>
              <th scope="col" className="py-2 pr-3">Done</th>
              <th scope="col" className="py-2 pr-3">In progress</th>
              <th scope="col" className="py-2 pr-3">Waiting</th>
              <th scope="col" className="py-2 pr-3">Withdrawn</th>
            </tr>
          </thead>
          <tbody>
            {progress.testers.flatMap((t) =>
              t.sittings.map((s) => (
                <tr key={`${t.testerId}-${s.sitting}`} className="border-b border-rule">
                  <td className="py-2 pr-3">{t.name}</td>
                  <td className="figures py-2 pr-3">{s.sitting}</td>
                  <td className="figures py-2 pr-3">{s.done}</td>
                  <td className="figures py-2 pr-3">{s.inProgress}</td>
                  <td className="figures py-2 pr-3">{s.waiting}</td>
                  <td className="figures py-2 pr-3">{s.withdrawn}</td>
                </tr>
              )),
            )}
          </tbody>
        </table>
      </section>

      <section className="flex flex-col gap-3">
        <h2 className="text-xl font-bold">Runs</h2>
        <ul className="flex flex-col divide-y divide-rule rounded-lg border border-rule bg-card">
          {progress.runs.map((r) => (
            <li key={r.id} className="flex flex-wrap items-center gap-x-4 gap-y-2 p-3" data-testid="progress-run">
              <span className="figures text-graphite-600">#{r.schedulePosition}</span>
              <span className="figures font-bold tracking-wider">{r.blindCode}</span>
              <span>{r.runOfBlade} run</span>
              <span className="text-graphite-600">sitting {r.sitting}</span>
              <span>{r.testerName}</span>
              <RunStateBadge state={r.state} words={r.stateWords} />
              {r.state !== "withdrawn" && study.state === "running" && (role === "owner" || (r.state !== "ended_threshold" && r.state !== "censored")) ? (
                <details className="ml-auto">
                  <summary className="min-h-target cursor-pointer font-bold">Withdraw…</summary>
                  <Form method="post" className="mt-2 flex flex-wrap gap-2">
                    <input type="hidden" name="intent" value="withdraw" />
                    <input type="hidden" name="runId" value={r.id} />
                    <ReasonCategorySelect />
                    <label className="flex flex-col font-bold">
                      Note (hidden from blinded readers until unblinding)
                      <input name="reason" required className="min-h-target rounded border border-graphite-400 px-2" />
                    </label>
                    {r.state === "ended_threshold" || r.state === "censored" ? <p className="w-full text-sm text-fault">This run has ended: as an owner you are the second person; the report lists it under “Withdrawals of ended runs”.</p> : null}
                    <button type="submit" className="min-h-target self-end rounded border border-fault px-3 font-bold text-fault">
                      Withdraw the run
                    </button>
                  </Form>
                </details>
              ) : null}
            </li>
          ))}
        </ul>
      </section>

      {waiting.length && testers.length > 1 ? (
        <section className="rounded-lg border border-rule bg-card p-4">
          <h2 className="mb-2 text-xl font-bold">Reassign waiting runs</h2>
          <p className="mb-3 text-graphite-800">Moving a run to another tester is a deviation from the schedule: it is recorded with your reason.</p>
          <Form method="post" className="flex flex-col gap-3">
            <input type="hidden" name="intent" value="reassign" />
            <fieldset className="flex flex-col gap-1">
              <legend className="font-bold">Runs</legend>
              {waiting.map((r) => (
                <label key={r.id} className="flex min-h-target items-center gap-3">
                  <input type="checkbox" name="runIds" value={r.id} className="h-6 w-6" />
                  <span className="figures">#{r.schedulePosition} {r.blindCode}</span> · {r.testerName}
                </label>
              ))}
            </fieldset>
            <label className="flex flex-col gap-1 font-bold">
              To tester
              <select name="toTesterId" className="min-h-target rounded border border-graphite-400 bg-card px-2">
                {testers.map((t) => (
                  <option key={t.id} value={t.id}>{t.name}</option>
                ))}
              </select>
            </label>
            <ReasonCategorySelect defaultValue="tester_unavailable" />
            <label className="flex flex-col gap-1 font-bold">
              Note (hidden from blinded readers until unblinding)
              <input name="reason" className="min-h-target rounded border border-graphite-400 px-2" />
            </label>
            <div>
              <button type="submit" className="min-h-target rounded bg-ink px-4 font-bold text-white">Reassign</button>
            </div>
          </Form>
        </section>
      ) : null}
    </div>
  );
}

function Figure({ label, value }: { label: string; value: number }) {
  return (
    <div className="rounded-lg border border-rule bg-card p-3">
      <p className="text-sm font-bold uppercase text-graphite-600">{label}</p>
      <p className="figures text-figure font-bold">{value}</p>
    </div>
  );
}
