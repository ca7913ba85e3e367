import { Link, redirect } from "react-router";
import type { Route } from "./+types/index";
import { PageTitle } from "~/components/form.tsx";
import { requireUser } from "~/server/access.server.ts";
import { labsOfUser } from "~/server/accounts.server.ts";
import { ROLE_LABELS } from "~/lib/roles.ts";

export const meta: Route.MetaFunction = () => [{ title: "Your labs · Blindcut" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const labs = await labsOfUser(user.id);
  // With one lab there is nothing to choose.
  if (labs.length === 1 && !new URL(request.url).searchParams.has("all")) throw redirect(`/labs/${labs[0].id}`);
  return { labs };
}

export default function Labs({ loaderData }: Route.ComponentProps) {
  return (
    <div>
      <PageTitle lead="You hold one role in each lab. Pick the lab to work in.">Your labs</PageTitle>
      {loaderData.labs.length === 0 ? (
        <p>You are not a member of any lab yet. Ask a lab owner for an invitation, or create a lab of your own.</p>
      ) : (
        <ul className="grid gap-3 md:grid-cols-2">
          {loaderData.labs.map((lab) => (
            <li key={lab.id}>
              <Link to={`/labs/${lab.id}`} className="block rounded-lg border border-rule bg-card p-4 no-underline hover:border-ink">
                <span className="block text-lg font-bold text-graphite-950">{lab.name}</span>
                <span className="text-graphite-600">{ROLE_LABELS[lab.role].name}</span>
              </Link>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
