import { data, Form } from "react-router";
import type { Route } from "./+types/preparation";
import { FormAlert, PageTitle } from "~/components/form.tsx";
import { BenchCautions } from "~/components/bench/cautions.tsx";
import { MANAGERS, notFound, requireLabRole, isUuid } from "~/server/access.server.ts";
import { BenchError } from "~/server/bench/api.server.ts";
import { HandOverInput, preparationList, recordHandOver, studyOfLab } from "~/server/bench/leads.server.ts";
import { parseForm } from "~/lib/forms.ts";
import { readFormData } from "~/server/form-data.server.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Preparation · ${data?.study.shortName ?? "Study"} · Blindcut` }];

// The preparer (an owner or lead) is not blind: this page names each run's condition and its recipe.
export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab, user } = await requireLabRole(request, params.labId, MANAGERS);
  const study = isUuid(params.studyId) ? await studyOfLab(lab.id, params.studyId) : null;
  if (!study) notFound();
  const list = await preparationList(lab.id, study.id);
  if (!list) notFound();
  return { study: { id: study.id, shortName: study.shortName, state: study.state }, list, isPreparer: list.preparerId === user.id };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { lab, user } = await requireLabRole(request, params.labId, MANAGERS);
  const study = isUuid(params.studyId) ? await studyOfLab(lab.id, params.studyId) : null;
  if (!study) notFound();
  const parsed = parseForm(HandOverInput, await readFormData(request));
  if (!parsed.ok) return data({ ok: false, message: "Choose a run" }, { status: 400 });
  try {
    await recordHandOver(lab.id, study.id, user.id, parsed.data);
    return { ok: true, message: "Hand-over recorded: the tester can now confirm it at the bench." };
  } catch (error) {
    if (error instanceof BenchError) return data({ ok: false, message: error.message }, { status: error.status });
    throw error;
  }
}

export default function PreparationPage({ loaderData, actionData }: Route.ComponentProps) {
  const { study, list, isPreparer } = loaderData;
  return (
    <div className="flex min-w-0 flex-col gap-6">
      <PageTitle lead="Runs still to be sharpened, in schedule order, each with its condition's recipe. Sharpen, then hand the blade over under its blind code only: never tell the tester the condition.">
        Preparation: {study.shortName}
      </PageTitle>
      {!list.preparerId ? <p className="rounded border border-rule bg-card p-3">This study has no preparer: its testers sharpen to the protocol's recipe.</p> : null}
      {list.preparerId && !isPreparer ? <p className="rounded border-l-4 border-signal bg-signal-soft p-3">The study's preparer is {list.preparerName}. Record a hand-over here only when you sharpened the blade yourself.</p> : null}
      <FormAlert tone={actionData?.ok ? "ok" : "fault"} message={actionData?.message} />
      {list.runs.length === 0 ? <p className="rounded border border-rule bg-card p-4">Nothing to sharpen now.</p> : null}
      <ol className="flex flex-col gap-3">
        {list.runs.map((r) => (
          <li key={r.id} className="rounded-lg border border-rule bg-card p-4" data-testid="preparation-run">
            <div className="flex flex-wrap items-baseline gap-x-4 gap-y-1">
              <span className="figures text-graphite-600">#{r.schedulePosition}</span>
              <span className="figures text-2xl font-bold tracking-wider">{r.blindCode}</span>
              <span>{r.runOfBlade} run · sitting {r.sitting} · {r.testerName}</span>
              {r.attempt > 1 ? <span className="font-bold text-signal">Attempt {r.attempt} (re-sharpen)</span> : null}
            </div>
            <p className="mt-2 font-bold">
              Condition: {r.condition} {r.neutralLabel ? <span className="font-normal text-graphite-600">({r.neutralLabel})</span> : null}
            </p>
            <ol className="mt-1 list-decimal pl-6">
              {r.recipe.map((s, i) => (
                <li key={i}>{s}</li>
              ))}
            </ol>
            {r.recipeIsProtocols ? <p className="text-sm text-graphite-600">The protocol's recipe.</p> : null}
            <div className="mt-3">
              {r.handedOver ? (
                <p className="font-bold text-ok">✓ Handed over</p>
              ) : list.preparerId && study.state === "running" ? (
                <Form method="post">
                  <input type="hidden" name="runId" value={r.id} />
                  <button type="submit" className="min-h-target rounded bg-ink px-4 font-bold text-white">
                    Sharpened: record the hand-over
                  </button>
                </Form>
              ) : null}
            </div>
          </li>
        ))}
      </ol>
      <BenchCautions />
    </div>
  );
}
