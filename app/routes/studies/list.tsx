import { Link } from "react-router";
import { useLabDates } from "~/lib/use-lab-dates.ts";
import type { Route } from "./+types/list";
import { PageTitle } from "~/components/form.tsx";
import { EmptyState } from "~/components/table.tsx";
import { StudyStateBadge } from "~/components/study-state.tsx";
import { MANAGERS, requireLabRole } from "~/server/access.server.ts";
import { membersOfLab } from "~/server/accounts.server.ts";
import { listStudies } from "~/server/studies/designer.server.ts";
import { DESIGN_LABELS } from "~/lib/study-input.ts";

export const meta: Route.MetaFunction = () => [{ title: "Studies · Blindcut" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, MANAGERS);
  const [rows, members] = await Promise.all([listStudies(lab.id), membersOfLab(lab.id)]);
  return { lab, studies: rows, memberCount: members.length, testerCount: members.filter((m) => m.role === "tester").length };
}

export default function StudyList({ loaderData }: Route.ComponentProps) {
  const { formatDate } = useLabDates();
  const { lab, studies, memberCount, testerCount } = loaderData;
  return (
    <div>
      <PageTitle lead="Every study of the lab, from draft to unblinded. Design a study step by step, randomize it with a recorded seed, print its labels and start it.">Studies</PageTitle>
      {testerCount === 0 ? (
        <p className="mb-6 rounded border-l-4 border-signal bg-signal-soft p-3">
          <strong>{memberCount <= 1 ? "A lab with one person cannot run a blinded study." : "This lab has no tester yet."}</strong> A blinded study needs at least one member with the tester role: owners
          and leads can open every key, so they cannot test blind. <Link to={`/labs/${lab.id}/invitations`}>Invite a tester</Link>. You can still design a draft.
        </p>
      ) : null}
      <p className="mb-6">
        <Link to={`/labs/${lab.id}/studies/new`} className="inline-flex min-h-target items-center rounded bg-ink px-4 font-bold text-white no-underline hover:bg-ink-deep">
          New study
        </Link>
      </p>
      {studies.length === 0 ? (
        <EmptyState title="No studies yet">Start one: give it a short name, then work through the design steps.</EmptyState>
      ) : (
        <table className="w-full border-collapse text-left">
          <thead>
            <tr className="border-b-2 border-graphite-800">
              <th scope="col" className="py-2 pr-3">Study</th>
              <th scope="col" className="py-2 pr-3">State</th>
              <th scope="col" className="py-2 pr-3">Design</th>
              <th scope="col" className="py-2 pr-3 text-right">Runs</th>
              <th scope="col" className="py-2">Last change</th>
            </tr>
          </thead>
          <tbody>
            {studies.map((s) => (
              <tr key={s.id} className="border-b border-rule">
                <td className="py-2 pr-3">
                  <Link to={`/labs/${lab.id}/studies/${s.id}`} className="inline-flex min-h-target items-center font-bold">
                    {s.shortName}
                  </Link>
                </td>
                <td className="py-2 pr-3">
                  <StudyStateBadge state={s.state} />
                </td>
                <td className="py-2 pr-3">{DESIGN_LABELS[s.design].title}</td>
                <td className="figures py-2 pr-3 text-right">{s.runs}</td>
                <td className="figures py-2">{formatDate(s.updatedAt)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </div>
  );
}
