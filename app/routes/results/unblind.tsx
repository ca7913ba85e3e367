import { Form, Link } from "react-router";
import { studyLifecycleAction } from "~/server/analysis/lifecycle-action.server.ts";
import type { Route } from "./+types/unblind";
import { FormAlert, PageTitle, SubmitButton } from "~/components/form.tsx";
import { requireLabRole, isUuid, notFound } from "~/server/access.server.ts";
import { studyOfLab } from "~/server/analysis/access.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Unblind the study · Blindcut" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, ["owner", "lead"]);
  // Only the name and state: the confirmation needs nothing of the study's data.
  const study = isUuid(params.studyId) ? await studyOfLab(lab.id, params.studyId) : null;
  if (!study) notFound();
  return { lab, study };
}

export function action({ request, params }: Route.ActionArgs) {
  return studyLifecycleAction(request, params, "unblind", (form) => form.get("confirm") === "unblind", "Tick the box to confirm that you want to unblind the study.");
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
