import { Form, Link, data, redirect } from "react-router";
import type { Route } from "./+types/unblind";
import { FormAlert, PageTitle, SubmitButton } from "~/components/form.tsx";
import { requireLabRole, isUuid, notFound } from "~/server/access.server.ts";
import { loadStudyRecord } from "~/server/analysis/study-data.server.ts";
import { studyOfLab } from "~/server/analysis/access.server.ts";
import { LifecycleError, mailAnalysts, unblindStudy } from "~/server/analysis/lifecycle.server.ts";
import { readFormData } from "~/server/form-data.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Unblind the study · Blindcut" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, ["owner", "lead"]);
  const record = isUuid(params.studyId) ? await loadStudyRecord(lab.id, params.studyId) : null;
  if (!record) notFound();
  return { lab, study: { id: record.study.id, shortName: record.study.shortName, state: record.study.state } };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { lab, user } = await requireLabRole(request, params.labId, ["owner", "lead"]);
  if (!isUuid(params.studyId) || !(await studyOfLab(lab.id, params.studyId))) notFound();
  const form = await readFormData(request);
  if (form.get("confirm") !== "unblind") return data({ error: "Tick the box to confirm that you want to unblind the study." }, { status: 400 });
  try {
    const { study } = await unblindStudy(user.id, lab.id, params.studyId);
    await mailAnalysts(request, lab.id, params.studyId, study.shortName, "unblinded");
    return redirect(`/labs/${lab.id}/studies/${params.studyId}/results`);
  } catch (error) {
    if (error instanceof LifecycleError) {
      if (error.status === 404) notFound();
      return data({ error: error.message }, { status: error.status });
    }
    throw error;
  }
}

export default function Unblind({ loaderData, actionData }: Route.ComponentProps) {
  const { lab, study } = loaderData;
  const back = `/labs/${lab.id}/studies/${study.id}/results`;
  if (study.state !== "closed") {
    return (
      <div className="mx-auto max-w-2xl">
        <PageTitle>Unblind {study.shortName}</PageTitle>
        <p>{study.state === "unblinded" ? "This study is already unblinded." : "Only a closed study can be unblinded. Close it first."}</p>
        <p className="mt-4"><Link to={back}>Back to the results</Link></p>
      </div>
    );
  }
  return (
    <div className="mx-auto max-w-2xl">
      <PageTitle>Unblind {study.shortName}?</PageTitle>
      <div className="rounded border-l-4 border-signal bg-signal-soft p-4">
        <p className="font-bold">Unblinding cannot be undone.</p>
        <ul className="mt-2 list-disc pl-6">
          <li>The results page, the report and the exports will show each arm's real name and description beside its neutral label.</li>
          <li>The blinded analysis taken at closing stays as it is, with its hash: the page will say the analysis was done blind, and when.</li>
          <li>An audit event records who unblinded the study and when, and the lab's analysts are e-mailed.</li>
        </ul>
      </div>
      <Form method="post" className="mt-6 flex flex-col gap-4">
        <FormAlert message={actionData?.error} />
        <label className="flex min-h-target items-center gap-3 font-bold">
          <input type="checkbox" name="confirm" value="unblind" className="h-6 w-6" />
          I understand: unblind this study now.
        </label>
        <div className="flex gap-3">
          <SubmitButton>Unblind the study</SubmitButton>
          <Link to={back} className="inline-flex min-h-target items-center rounded border border-graphite-400 px-4 font-bold text-graphite-950 no-underline">Cancel</Link>
        </div>
      </Form>
    </div>
  );
}
