import { Link } from "react-router";
import type { Route } from "./+types/queue";
import { PageTitle } from "~/components/form.tsx";
import { BenchCautions } from "~/components/bench/cautions.tsx";
import { RunStateBadge } from "~/components/bench/state-badge.tsx";
import { requireUser } from "~/server/access.server.ts";
import { testerQueue } from "~/server/bench/queue.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "My runs · Blindcut" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  return { studies: await testerQueue(user.id) };
}

export default function BenchQueue({ loaderData }: Route.ComponentProps) {
  const { studies } = loaderData;
  return (
    <div className="flex flex-col gap-6">
      <PageTitle lead="Your runs in every running study, in schedule order, by sitting. Start with the next one: starting another asks for a reason.">
        My runs
      </PageTitle>
      {studies.length === 0 ? (
        <p className="rounded-lg border border-rule bg-card p-6 text-lg" data-testid="queue-empty">
          No runs are assigned to you in a running study. When a lead starts a study with you as a tester, its runs appear here.
        </p>
      ) : null}
      {studies.map((s) => (
        <section key={s.studyId} aria-labelledby={`study-${s.studyId}`} className="rounded-lg border border-rule bg-card p-4" data-testid="queue-study">
          <div className="mb-3 flex flex-wrap items-baseline justify-between gap-2">
            <h2 id={`study-${s.studyId}`} className="text-2xl font-bold">
              {s.shortName}
            </h2>
            <p className="text-graphite-600">
              {s.labName} · <span className="figures">{s.remaining}</span> to do
            </p>
          </div>
          {s.sittings.map((sitting) => (
            <div key={sitting.sitting} className="mb-4">
              <h3 className="mb-2 font-bold text-graphite-800">Sitting {sitting.sitting}</h3>
              <ol className="flex flex-col gap-2">
                {sitting.runs.map((r) => (
                  <li key={r.id}>
                    <Link
                      to={r.url}
                      data-testid="queue-run"
                      data-next={r.isNext ? "yes" : undefined}
                      className={`flex min-h-target flex-wrap items-center gap-x-4 gap-y-1 rounded border px-4 py-3 no-underline ${r.isNext ? "border-2 border-ink bg-paper" : "border-rule hover:border-ink"}`}
                    >
                      <span className="figures text-sm text-graphite-600">#{r.schedulePosition}</span>
                      <span className="figures text-2xl font-bold tracking-wider text-graphite-950">{r.blindCode}</span>
                      <span className="text-graphite-800">{r.runOfBlade}</span>
                      <RunStateBadge state={r.state} words={r.stateWords} />
                      {r.isNext ? <span className="ml-auto font-bold text-ink">▶ Next</span> : null}
                    </Link>
                  </li>
                ))}
              </ol>
            </div>
          ))}
        </section>
      ))}
      <BenchCautions />
    </div>
  );
}
