import { Form, Link, data, redirect } from "react-router";
import type { Route } from "./+types/start";
import { FormAlert, PageTitle, SubmitButton } from "~/components/form.tsx";
import { StudyStateBadge } from "~/components/study-state.tsx";
import { MANAGERS, requireLabRole } from "~/server/access.server.ts";
import { refusalResponse, studyIdParam } from "~/server/studies/designer.server.ts";
import { startPagePreview, startStudy } from "~/server/studies/schedule.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Start the study · Blindcut" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, MANAGERS);
  const studyId = studyIdParam(params.studyId);
  const preview = await startPagePreview(lab.id, studyId);
  if (!preview) throw data("This study does not exist, or it belongs to another lab.", { status: 404 });
  const { study, perTester } = preview;
  return { lab, study, perTester };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { lab, user } = await requireLabRole(request, params.labId, MANAGERS);
  const studyId = studyIdParam(params.studyId);
  try {
    const { testers, failed } = await startStudy(user.id, lab.id, studyId, request);
    const q = new URLSearchParams({ started: String(testers) });
    if (failed.length) q.set("mailFailed", failed.join(", "));
    return redirect(`/labs/${lab.id}/studies/${studyId}?${q}`);
  } catch (error) {
    return refusalResponse(error);
  }
}

export default function StartStudy({ loaderData, actionData }: Route.ComponentProps) {
  const { lab, study, perTester } = loaderData;
  const base = `/labs/${lab.id}/studies/${study.id}`;
  return (
    <div className="max-w-2xl">
      <p className="mb-2">
        <Link to={base}>← {study.shortName}</Link>
      </p>
      <PageTitle lead="Starting opens the testers' queues at the bench. Once the first reading is taken, the randomization can no longer be re-rolled.">
        Start the study <StudyStateBadge state={study.state} />
      </PageTitle>
      <FormAlert message={actionData && !actionData.ok ? actionData.formError : undefined} />
      {study.state === "randomized" ? (
        <>
          <p className="mb-2">Each tester gets an e-mail with how many runs they have and a link to their queue. The mail names the study by its short name and nothing else: no code, no blade, no arm.</p>
          <ul className="figures mb-4 list-disc pl-6">
            {perTester.map((t) => (
              <li key={t.name}>
                {t.name}: {t.runs} run{t.runs === 1 ? "" : "s"}
              </li>
            ))}
          </ul>
          <p className="mb-4">Before you start: print the label sheet and put each label on its blade, using the schedule CSV as the key.</p>
          <Form method="post">
            <SubmitButton>Start the study and tell the testers</SubmitButton>
          </Form>
        </>
      ) : (
        <p className="rounded border-2 border-graphite-800 p-3">{study.state === "draft" ? "□ Randomize the study before starting it." : `The study is already ${study.state}.`}</p>
      )}
    </div>
  );
}
