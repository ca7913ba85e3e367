import { Link } from "react-router";
import type { Route } from "./+types/list";
import { PageTitle } from "~/components/form.tsx";
import { StateBadge } from "~/components/protocol-view.tsx";
import { ALL_ROLES, requireLabRole } from "~/server/access.server.ts";
import { canWriteProtocols, listProtocols } from "~/server/protocols.server.ts";
import { MEASUREMENT_KIND_LABELS } from "~/domain/protocol.ts";

export const meta: Route.MetaFunction = () => [{ title: "Protocols · Blindcut" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab, role } = await requireLabRole(request, params.labId, ALL_ROLES);
  const canWrite = canWriteProtocols(role);
  return { lab, canWrite, protocols: await listProtocols(lab.id, { includeDrafts: canWrite }) };
}

export default function ProtocolList({ loaderData }: Route.ComponentProps) {
  const { lab, canWrite, protocols } = loaderData;
  return (
    <div>
      <PageTitle
        lead={
          canWrite
            ? "Write a protocol, publish it to freeze it, and studies can use it. Later changes make a new version."
            : "The lab's published protocols. Open one to read it or print its bench page."
        }
      >
        Protocols
      </PageTitle>
      {canWrite ? (
        <p className="mb-6">
          <Link to={`/labs/${lab.id}/protocols/new`} className="inline-flex min-h-target items-center rounded bg-ink px-4 font-bold text-white no-underline hover:bg-ink-deep">
            New protocol
          </Link>
        </p>
      ) : null}
      {protocols.length === 0 ? (
        <p className="text-graphite-600">{canWrite ? "No protocols yet. Start one from a template." : "No published protocols yet."}</p>
      ) : (
        <table className="w-full border-collapse text-left">
          <thead>
            <tr className="border-b-2 border-graphite-800">
              <th scope="col" className="py-2">Protocol</th>
              <th scope="col" className="py-2">Measures</th>
              <th scope="col" className="py-2">Published</th>
              {canWrite ? <th scope="col" className="py-2">Draft</th> : null}
            </tr>
          </thead>
          <tbody>
            {protocols.map((p) => (
              <tr key={p.id} className="border-b border-rule">
                <td className="py-2">
                  <Link to={`/labs/${lab.id}/protocols/${p.id}`} className="inline-flex min-h-target items-center font-bold">
                    {p.name}
                  </Link>
                </td>
                <td className="py-2">{MEASUREMENT_KIND_LABELS[p.measurementKind]}</td>
                <td className="py-2">
                  {p.latestPublished ? (
                    <span className="inline-flex items-center gap-2">
                      <StateBadge state="published" /> <span className="figures">version {p.latestPublished}</span>
                    </span>
                  ) : (
                    <span className="text-graphite-600">Not yet</span>
                  )}
                </td>
                {canWrite ? (
                  <td className="py-2">
                    {p.draftVersion ? (
                      <span className="inline-flex items-center gap-2">
                        <StateBadge state="draft" /> <span className="figures">version {p.draftVersion}</span>
                      </span>
                    ) : (
                      <span className="text-graphite-600">None</span>
                    )}
                  </td>
                ) : null}
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </div>
  );
}
