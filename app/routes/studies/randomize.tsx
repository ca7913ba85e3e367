import { Form, Link, data, redirect } from "react-router";
import { useLabDates } from "~/lib/use-lab-dates.ts";
import { studyOfLab } from "~/server/analysis/access.server.ts";
import type { Route } from "./+types/randomize";
import { Field, FormAlert, PageTitle, SubmitButton } from "~/components/form.tsx";
import { StudyStateBadge } from "~/components/study-state.tsx";
import { ProblemList, StudySteps } from "~/components/study-steps.tsx";
import { shortHash } from "~/components/protocol-view.tsx";
import { MANAGERS, requireLabRole } from "~/server/access.server.ts";
import { getDesigner, refusalResponse, studyIdParam, throwRefusal } from "~/server/studies/designer.server.ts";
import { randomizeStudy } from "~/server/studies/randomize.server.ts";
import { schedulePreview } from "~/server/studies/schedule.server.ts";
import { parseForm } from "~/lib/forms.ts";
import { SeedSchema } from "~/lib/study-input.ts";
import { readFormData } from "~/server/form-data.server.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Randomize · ${data?.study.shortName ?? "Study"} · Blindcut` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, MANAGERS);
  const studyId = studyIdParam(params.studyId);
  const d = await getDesigner(lab.id, studyId);
  if (!d) throw data("This study does not exist, or it belongs to another lab.", { status: 404 });
  const preview = await schedulePreview(lab.id, studyId).catch(throwRefusal);
  const testerName = new Map(d.members.map((m) => [m.userId, m.name]));
  const armName = new Map(d.arms.map((a) => [a.id, a.name]));
  return {
    lab,
    study: { id: d.study.id, shortName: d.study.shortName, state: d.study.state, design: d.study.design, seed: d.study.seed, seedSource: d.study.seedSource, algorithmVersion: d.study.algorithmVersion, designHash: d.study.designHash, scheduleHash: d.study.scheduleHash },
    steps: d.steps,
    problems: d.study.state === "draft" ? d.problems : [],
    rows: preview.rows.map((r) => ({ position: r.position, sitting: r.sitting, tester: r.testerName, code: r.code, bladeRun: r.bladeRunNumber, label: r.neutralLabel ?? "" })),
    balance: preview.balance
      ? {
          labels: preview.balance.byTreatment.map((t) => ({ label: t.label, name: armName.get(t.treatmentId) ?? "", runs: t.runs })),
          testers: preview.balance.byTester.map((t) => ({
            name: testerName.get(t.testerId) ?? "",
            runs: t.runs,
            spread: t.spread,
            byTreatment: t.byTreatment.map((x) => x.runs),
            sittings: [...new Set(preview.balance!.cells.filter((c) => c.testerId === t.testerId).map((c) => c.sitting))].map((sitting) => ({
              sitting,
              counts: preview.balance!.byTreatment.map((tr) => preview.balance!.cells.find((c) => c.testerId === t.testerId && c.sitting === sitting && c.treatmentId === tr.treatmentId)?.runs ?? 0),
            })),
          })),
          maxSpread: preview.balance.maxTesterSpread,
        }
      : null,
    rolls: preview.rolls.map((r) => ({ seed: r.seed, scheduleHash: r.scheduleHash, at: r.rolledAt.toISOString(), by: r.by ?? "" })),
    canReroll: d.study.state === "randomized" && preview.readings === 0,
    readings: preview.readings,
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { lab, user } = await requireLabRole(request, params.labId, MANAGERS);
  const studyId = studyIdParam(params.studyId);
  if (!(await studyOfLab(lab.id, studyId))) throw data("This study does not exist, or it belongs to another lab.", { status: 404 });
  const parsed = parseForm(SeedSchema, await readFormData(request));
  if (!parsed.ok) return data({ ...parsed, problems: [] as string[] }, { status: 400 });
  // The designer's own checks (blades retired or checked out since enrolment, a preparer
  // who is no longer an owner or lead, block sizes) come on top of designProblems.
  const d = await getDesigner(lab.id, studyId);
  if (!d) throw data("This study does not exist, or it belongs to another lab.", { status: 404 });
  if ((d.study.state === "draft" || d.study.state === "randomized") && d.problems.length) {
    return data({ ok: false as const, errors: {} as Record<string, string>, values: { seed: parsed.data.seed ?? "" }, formError: "The design cannot be randomized yet.", problems: d.problems }, { status: 400 });
  }
  try {
    await randomizeStudy(user.id, lab.id, studyId, parsed.data.seed);
  } catch (error) {
    return refusalResponse(error, parsed.ok ? { seed: parsed.data.seed ?? "" } : {});
  }
  return redirect(`/labs/${lab.id}/studies/${studyId}/randomize?rolled=1`);
}

export default function Randomize({ loaderData, actionData }: Route.ComponentProps) {
  const { formatDateTime } = useLabDates();
  const d = loaderData;
  const base = `/labs/${d.lab.id}/studies/${d.study.id}`;
  const failure = actionData && !actionData.ok ? actionData : null;
  const draft = d.study.state === "draft";
  return (
    <div>
      <p className="mb-2">
        <Link to={base}>← {d.study.shortName}</Link>
      </p>
      <PageTitle lead="The seed decides the run order, the blind codes and the neutral arm names. The same design, seed and algorithm version give the same schedule on any machine.">
        {draft ? "Review and randomize" : "Schedule"} <StudyStateBadge state={d.study.state} />
      </PageTitle>
      {draft ? <StudySteps labId={d.lab.id} studyId={d.study.id} steps={d.steps} current="randomize" /> : null}
      {draft ? <ProblemList problems={d.problems} /> : null}
      {failure ? (
        <div className="mt-4 flex flex-col gap-2">
          <FormAlert message={failure.formError} />
          {"problems" in failure && failure.problems?.length ? <ProblemList problems={failure.problems} /> : null}
        </div>
      ) : null}

      {draft || d.canReroll ? (
        <Form method="post" className="mt-6 flex max-w-xl flex-col gap-3 rounded-lg border border-rule bg-card p-4" noValidate>
          <h2 className="text-xl font-bold">{draft ? "Randomize" : "Re-roll with a new seed"}</h2>
          {!draft ? <p className="text-graphite-800">No reading has been taken yet, so the schedule may be rolled again. Every roll stays on the record.</p> : null}
          <Field label="Seed" name="seed" defaultValue={failure?.values?.seed ?? ""} error={failure?.errors?.seed} hint="Leave empty: the server draws the seed (cryptographic random), so nobody chooses it. Type one only to reproduce a published study; it is then marked as typed. Every roll and its time are in the report." />
          <div>
            <SubmitButton>{draft ? "Randomize the study" : "Re-roll"}</SubmitButton>
          </div>
        </Form>
      ) : d.study.state !== "draft" ? (
        <p className="mt-4 rounded border-2 border-graphite-800 p-3">
          ■ {d.readings > 0 ? `Readings have been taken (${d.readings}): the randomization can no longer be re-rolled.` : `The study is ${d.study.state}: the randomization can no longer be re-rolled.`}
        </p>
      ) : null}

      {!draft ? (
        <section className="mt-8" aria-labelledby="preview-title">
          <h2 id="preview-title" className="text-2xl font-bold">
            Schedule preview
          </h2>
          <dl className="figures my-3 grid gap-1 md:grid-cols-[14rem_1fr]">
            <dt className="font-bold">Seed</dt>
            <dd data-testid="seed">{d.study.seed}</dd>
            <dt className="font-bold">Seed source</dt>
            <dd data-testid="seed-source">{d.study.seedSource === "server" ? "drawn by the server" : d.study.seedSource === "typed" ? "typed by the lead" : "not recorded"}</dd>
            <dt className="font-bold">Rolls before the final one</dt>
            <dd data-testid="earlier-rolls">{Math.max(0, d.rolls.length - 1)}</dd>
            <dt className="font-bold">Algorithm version</dt>
            <dd>{d.study.algorithmVersion}</dd>
            <dt className="font-bold">Design hash</dt>
            <dd title={d.study.designHash ?? ""}>{shortHash(d.study.designHash)}</dd>
            <dt className="font-bold">Schedule hash</dt>
            <dd title={d.study.scheduleHash ?? ""} data-testid="schedule-hash">{shortHash(d.study.scheduleHash)}</dd>
          </dl>
          <p className="mb-4 flex flex-wrap gap-3">
            <Link to={`${base}/labels`} className="inline-flex min-h-target items-center rounded border border-graphite-800 bg-card px-4 font-bold no-underline">Label sheet</Link>
            <a href={`${base}/schedule.csv`} download className="inline-flex min-h-target items-center rounded border border-graphite-800 bg-card px-4 font-bold no-underline">Schedule CSV (the key)</a>
            {d.study.state === "randomized" ? (
              <Link to={`${base}/start`} className="inline-flex min-h-target items-center rounded bg-ink px-4 font-bold text-white no-underline">Start the study</Link>
            ) : null}
          </p>

          {d.balance ? (
            <div className="mb-6 overflow-x-auto">
              <h3 className="text-xl font-bold">Balance: runs per arm × tester × sitting</h3>
              <p className="text-graphite-800">
                Largest difference between a tester's arms: <strong className="figures">{d.balance.maxSpread}</strong> {d.balance.maxSpread <= 1 ? "(balanced within one)" : ""}
              </p>
              <table className="figures mt-2 border-collapse text-left" data-testid="balance">
                <thead>
                  <tr className="border-b-2 border-graphite-800">
                    <th scope="col" className="py-2 pr-4">Tester</th>
                    <th scope="col" className="py-2 pr-4">Sitting</th>
                    {d.balance.labels.map((l) => (
                      <th key={l.label} scope="col" className="py-2 pr-4 text-right" title={l.name}>
                        {l.label}
                      </th>
                    ))}
                  </tr>
                </thead>
                <tbody>
                  {d.balance.testers.flatMap((t) => [
                    ...t.sittings.map((s) => (
                      <tr key={`${t.name}-${s.sitting}`} className="border-b border-rule">
                        <td className="py-1 pr-4">{t.name}</td>
                        <td className="py-1 pr-4">{s.sitting}</td>
                        {s.counts.map((c, i) => (
                          <td key={i} className="py-1 pr-4 text-right">{c}</td>
                        ))}
                      </tr>
                    )),
                    <tr key={`${t.name}-total`} className="border-b-2 border-graphite-400 font-bold">
                      <td className="py-1 pr-4">{t.name}</td>
                      <td className="py-1 pr-4">all</td>
                      {t.byTreatment.map((c, i) => (
                        <td key={i} className="py-1 pr-4 text-right">{c}</td>
                      ))}
                    </tr>,
                  ])}
                  <tr className="font-bold">
                    <td className="py-1 pr-4">Everyone</td>
                    <td className="py-1 pr-4">all</td>
                    {d.balance.labels.map((l) => (
                      <td key={l.label} className="py-1 pr-4 text-right">{l.runs}</td>
                    ))}
                  </tr>
                </tbody>
              </table>
              <p className="mt-2 text-sm text-graphite-600">
                Key (for you only): {d.balance.labels.map((l) => `${l.label} = ${l.name}`).join("; ")}.
              </p>
            </div>
          ) : null}

          <h3 className="text-xl font-bold">Run order</h3>
          <table className="figures mt-2 w-full border-collapse text-left" data-testid="schedule">
            <thead>
              <tr className="border-b-2 border-graphite-800">
                <th scope="col" className="py-2 pr-3 text-right">Run</th>
                <th scope="col" className="py-2 pr-3 text-right">Sitting</th>
                <th scope="col" className="py-2 pr-3">Tester</th>
                <th scope="col" className="py-2 pr-3">Blind code</th>
                <th scope="col" className="py-2 pr-3 text-right">Blade's run</th>
                <th scope="col" className="py-2">Arm</th>
              </tr>
            </thead>
            <tbody>
              {d.rows.map((r) => (
                <tr key={r.position} className="border-b border-rule">
                  <td className="py-1 pr-3 text-right">{r.position}</td>
                  <td className="py-1 pr-3 text-right">{r.sitting}</td>
                  <td className="py-1 pr-3">{r.tester}</td>
                  <td className="py-1 pr-3 text-lg font-bold tracking-wider">{r.code}</td>
                  <td className="py-1 pr-3 text-right">{r.bladeRun}</td>
                  <td className="py-1">{r.label}</td>
                </tr>
              ))}
            </tbody>
          </table>

          {d.rolls.length ? (
            <>
              <h3 className="mt-6 text-xl font-bold">Rolls on the record</h3>
              <ol className="figures list-decimal pl-6">
                {d.rolls.map((r, i) => (
                  <li key={i}>
                    {formatDateTime(r.at)} — seed “{r.seed}”, schedule {shortHash(r.scheduleHash)}
                    {r.by ? `, by ${r.by}` : ""}
                  </li>
                ))}
              </ol>
            </>
          ) : null}
        </section>
      ) : null}
    </div>
  );
}
