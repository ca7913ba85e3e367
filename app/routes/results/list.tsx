import { Link } from "react-router";
import { StudyStateBadge } from "~/components/study-state.tsx";
import { useLabDates } from "~/lib/use-lab-dates.ts";
import type { Route } from "./+types/list";
import { PageTitle } from "~/components/form.tsx";
import { EmptyState } from "~/components/table.tsx";
import { requireLabRole } from "~/server/access.server.ts";
import { RESULT_READERS } from "~/server/analysis/access.server.ts";
import { closedStudiesOfLab } from "~/server/analysis/lifecycle.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Results · Blindcut" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, RESULT_READERS);
  const rows = await closedStudiesOfLab(lab.id);
  return { lab, studies: rows.map((s) => ({ ...s, closedAt: s.closedAt?.toISOString().slice(0, 10) ?? null })) };
}

export default function ResultsList({ loaderData }: Route.ComponentProps) {
  const { formatDate } = useLabDates();
  const { lab } = loaderData;
  return (
    <div>
      <PageTitle lead="Closed studies of the lab. Until a lead unblinds a study, its arms are shown under neutral names.">Results</PageTitle>
      {loaderData.studies.length === 0 ? (
        <EmptyState title="No closed study yet">Results appear here when a lead closes a study.</EmptyState>
      ) : (
        <ul className="grid gap-3 md:grid-cols-2">
          {loaderData.studies.map((s) => (
            <li key={s.id}>
              <Link to={`/labs/${lab.id}/studies/${s.id}/results`} className="block rounded-lg border border-rule bg-card p-4 no-underline hover:border-ink">
                <span className="block text-lg font-bold text-graphite-950">{s.shortName}</span>
                <span className="flex flex-wrap items-center gap-2 text-graphite-600"><StudyStateBadge state={s.state} /> {s.closedAt ? `closed ${formatDate(s.closedAt)}` : null}</span>
              </Link>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
