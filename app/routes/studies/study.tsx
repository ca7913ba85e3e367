import { Link, data } from "react-router";
import type { Route } from "./+types/study";
import { PageTitle } from "~/components/form.tsx";
import { StudyStateBadge } from "~/components/study-state.tsx";
import { ProblemList, StudySteps } from "~/components/study-steps.tsx";
import { shortHash } from "~/components/protocol-view.tsx";
import { MANAGERS, requireLabRole } from "~/server/access.server.ts";
import { getDesigner, studyIdParam } from "~/server/studies/designer.server.ts";
import { DESIGN_LABELS } from "~/lib/study-input.ts";
import { rollHistory } from "~/server/studies/rolls.server.ts";
import { useLabDates } from "~/lib/use-lab-dates.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.study.shortName ?? "Study"} · Blindcut` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, MANAGERS);
  const d = await getDesigner(lab.id, studyIdParam(params.studyId));
  if (!d) throw data("This study does not exist, or it belongs to another lab.", { status: 404 });
  const url = new URL(request.url);
  return {
    lab,
    study: { id: d.study.id, shortName: d.study.shortName, question: d.study.question, state: d.study.state, design: d.study.design, seed: d.study.seed, seedSource: d.study.seedSource, designHash: d.study.designHash, scheduleHash: d.study.scheduleHash, algorithmVersion: d.study.algorithmVersion },
    rolls: await rollHistory(d.study.id),
    steps: d.steps,
    problems: d.problems,
    started: url.searchParams.get("started"),
    mailFailed: url.searchParams.get("mailFailed"),
  };
}

const action = "inline-flex min-h-target items-center rounded border border-graphite-800 bg-card px-4 font-bold no-underline text-graphite-950 hover:bg-paper-deep";

export default function StudyPage({ loaderData }: Route.ComponentProps) {
  const { formatDateTime } = useLabDates();
  const { lab, study, steps, problems, started, mailFailed, rolls } = loaderData;
  const base = `/labs/${lab.id}/studies/${study.id}`;
  return (
    <div>
      <p className="mb-2">
        <Link to={`/labs/${lab.id}/studies`}>← Studies</Link>
      </p>
      <PageTitle lead={study.question || "No question yet."}>
        {study.shortName} <StudyStateBadge state={study.state} />
      </PageTitle>
      {started ? (
        <p role="status" className="mb-4 rounded border-l-4 border-ok bg-ok-soft p-3 font-bold text-ok">
          ▶ The study is running. {started} tester{started === "1" ? " was" : "s were"} told by e-mail how many runs they have.
          {mailFailed ? ` The mail to ${mailFailed} could not be sent: tell them yourself.` : ""}
        </p>
      ) : null}
      <p className="mb-4 text-graphite-800">{DESIGN_LABELS[study.design].title}.</p>
      {study.state === "draft" ? (
        <>
          <StudySteps labId={lab.id} studyId={study.id} steps={steps} />
          <ProblemList problems={problems} />
          <p className="mt-4 flex flex-wrap gap-3">
            <Link to={`${base}/design/${steps.find((s) => !s.complete)?.id ?? "question"}`} className={action}>
              {steps.every((s) => !s.complete) ? "Start the design" : "Resume the design"}
            </Link>
            <Link to={`${base}/randomize`} className={action}>Review and randomize</Link>
          </p>
        </>
      ) : (
        <>
          <dl className="figures mb-4 grid gap-1 md:grid-cols-[14rem_1fr]">
            <dt className="font-bold">Seed</dt>
            <dd>{study.seed}</dd>
            <dt className="font-bold">Seed source</dt>
            <dd data-testid="seed-source">{study.seedSource === "server" ? "drawn by the server (cryptographic random)" : study.seedSource === "typed" ? "typed by the lead" : "not recorded"}</dd>
            <dt className="font-bold">Rolls before the final one</dt>
            <dd data-testid="earlier-rolls">
              {rolls.earlier.length === 0 ? "none" : `${rolls.earlier.length}: ${rolls.earlier.map((r) => formatDateTime(r.at)).join(", ")}`}
              {rolls.finalAt ? ` · final roll ${formatDateTime(rolls.finalAt)}` : ""}
            </dd>
            <dt className="font-bold">Algorithm version</dt>
            <dd>{study.algorithmVersion}</dd>
            <dt className="font-bold">Design hash (SHA-256)</dt>
            <dd title={study.designHash ?? ""}>{shortHash(study.designHash)}</dd>
            <dt className="font-bold">Schedule hash (SHA-256)</dt>
            <dd title={study.scheduleHash ?? ""}>{shortHash(study.scheduleHash)}</dd>
          </dl>
          <p className="flex flex-wrap gap-3">
            <Link to={`${base}/randomize`} className={action}>Schedule{study.state === "randomized" ? " and re-roll" : ""}</Link>
            <Link to={`${base}/labels`} className={action}>Label sheet</Link>
            <a href={`${base}/schedule.csv`} className={action} download>Schedule CSV (the key)</a>
            {study.state === "randomized" ? (
              <Link to={`${base}/start`} className="inline-flex min-h-target items-center rounded bg-ink px-4 font-bold text-white no-underline hover:bg-ink-deep">
                Start the study
              </Link>
            ) : null}
            {study.state === "running" ? <Link to={`${base}/progress`} className={action}>Progress</Link> : null}
            {study.state === "running" || study.state === "closed" || study.state === "unblinded" ? (
              <Link to={`${base}/results`} className={action}>{study.state === "running" ? "Close and results" : "Results"}</Link>
            ) : null}
            <Link to={`${base}/design/question`} className={action}>The frozen design</Link>
          </p>
        </>
      )}
    </div>
  );
}
