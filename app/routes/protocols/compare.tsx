import { Link, data } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/compare";
import { PageTitle } from "~/components/form.tsx";
import { shortHash, StateBadge } from "~/components/protocol-view.tsx";
import { ALL_ROLES, requireLabRole } from "~/server/access.server.ts";
import { UserFacingError } from "~/server/accounts.server.ts";
import { canWriteProtocols, compareVersions, forbidDrafts, protocolIdParam, requireProtocolOfLab } from "~/server/protocols.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Compare versions · Blindcut" }];

const CompareQuery = z.object({
  a: z.coerce.number().int().min(1),
  b: z.coerce.number().int().min(1),
});

function show(value: unknown): string {
  if (value === null || value === undefined) return "—";
  if (typeof value === "boolean") return value ? "Yes" : "No";
  if (typeof value === "object") return JSON.stringify(value);
  return String(value);
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab, role } = await requireLabRole(request, params.labId, ALL_ROLES);
  const protocolId = protocolIdParam(params.protocolId);
  await requireProtocolOfLab(lab.id, protocolId).catch(() => {
    throw data("Not found", { status: 404 });
  });
  const url = new URL(request.url);
  const query = CompareQuery.safeParse({ a: url.searchParams.get("a"), b: url.searchParams.get("b") });
  if (!query.success) throw data("Choose two versions to compare, e.g. ?a=1&b=2.", { status: 400 });
  try {
    const { a, b, changes } = await compareVersions(lab.id, protocolId, query.data.a, query.data.b);
    if (!canWriteProtocols(role) && (a.state === "draft" || b.state === "draft")) forbidDrafts();
    return {
      lab,
      protocolId,
      name: b.content.name,
      a: { version: a.version, state: a.state, hash: a.contentHash },
      b: { version: b.version, state: b.state, hash: b.contentHash },
      changes: changes.map((c) => ({ path: c.path, label: c.label, before: show(c.before), after: show(c.after) })),
    };
  } catch (error) {
    if (error instanceof UserFacingError) throw data(error.message, { status: error.status });
    throw error;
  }
}

export default function Compare({ loaderData }: Route.ComponentProps) {
  const { lab, protocolId, name, a, b, changes } = loaderData;
  return (
    <div>
      <p className="mb-2">
        <Link to={`/labs/${lab.id}/protocols/${protocolId}`}>← All versions of this protocol</Link>
      </p>
      <PageTitle lead={changes.length === 0 ? "The two versions have the same content." : `${changes.length} field${changes.length === 1 ? "" : "s"} differ. Only changed fields are listed.`}>
        {name}: version {a.version} and version {b.version}
      </PageTitle>
      <div className="mb-6 grid gap-3 md:grid-cols-2">
        {[a, b].map((v) => (
          <p key={v.version} className="rounded border border-rule bg-card p-3">
            <span className="font-bold">Version {v.version}</span> <StateBadge state={v.state} />
            <span className="block font-mono text-sm">{shortHash(v.hash)}</span>
          </p>
        ))}
      </div>
      {changes.length ? (
        <table className="w-full border-collapse text-left" data-testid="changes">
          <thead>
            <tr className="border-b-2 border-graphite-800">
              <th scope="col" className="py-2">Field</th>
              <th scope="col" className="py-2">Version {a.version}</th>
              <th scope="col" className="py-2">Version {b.version}</th>
            </tr>
          </thead>
          <tbody>
            {changes.map((c) => (
              <tr key={c.path} data-path={c.path} className="border-b border-rule align-top">
                <th scope="row" className="py-2 pr-3">
                  <span aria-hidden="true" className="mr-1">≠</span>
                  {c.label}
                </th>
                <td className="py-2 pr-3">
                  <del className="bg-paper-deep decoration-graphite-400">{c.before}</del>
                </td>
                <td className="py-2">
                  <ins className="border-l-4 border-ink bg-card pl-2 font-bold no-underline">{c.after}</ins>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      ) : null}
    </div>
  );
}
