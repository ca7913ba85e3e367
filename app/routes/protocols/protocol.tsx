import { Form, Link, data, redirect } from "react-router";
import { useLabDates } from "~/lib/use-lab-dates.ts";
import { z } from "zod";
import type { Route } from "./+types/protocol";
import { FormAlert, PageTitle, SubmitButton } from "~/components/form.tsx";
import { shortHash, StateBadge } from "~/components/protocol-view.tsx";
import { ALL_ROLES, MANAGERS, requireLabRole } from "~/server/access.server.ts";
import { UserFacingError } from "~/server/accounts.server.ts";
import { canWriteProtocols, forbidDrafts, getProtocol, newDraftFrom, protocolIdParam, requireProtocolOfLab } from "~/server/protocols.server.ts";
import { parseForm } from "~/lib/forms.ts";
import { readFormData } from "~/server/form-data.server.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.name ?? "Protocol"} · Blindcut` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab, role } = await requireLabRole(request, params.labId, ALL_ROLES);
  const protocolId = protocolIdParam(params.protocolId);
  const canWrite = canWriteProtocols(role);
  const { protocol, versions } = await getProtocol(lab.id, protocolId, { includeDrafts: canWrite }).catch(rethrow);
  // A protocol with drafts only is not yet anything a tester or analyst may read.
  if (!versions.length) forbidDrafts();
  const name = canWrite ? protocol.name : (versions.find((v) => v.state === "published")?.name ?? protocol.name);
  return {
    lab,
    canWrite,
    protocolId,
    name,
    hasDraft: versions.some((v) => v.state === "draft"),
    versions: versions.map((v) => ({ ...v, publishedAt: v.publishedAt?.toISOString() ?? null, updatedAt: v.updatedAt.toISOString() })),
  };
}

function rethrow(error: unknown): never {
  if (error instanceof UserFacingError) throw data(error.message, { status: error.status });
  throw error;
}

const NewDraftSchema = z.object({ intent: z.literal("new-draft"), fromVersion: z.coerce.number({ error: "Choose a version" }).int().min(1, "Choose a version") });

export async function action({ request, params }: Route.ActionArgs) {
  const { lab, user } = await requireLabRole(request, params.labId, MANAGERS);
  const protocolId = protocolIdParam(params.protocolId);
  await requireProtocolOfLab(lab.id, protocolId).catch(() => {
    throw data("Not found", { status: 404 });
  });
  const parsed = parseForm(NewDraftSchema, await readFormData(request));
  if (!parsed.ok) return data({ error: Object.values(parsed.errors)[0] ?? "Check the form" }, { status: 400 });
  try {
    const created = await newDraftFrom(user, lab.id, protocolId, parsed.data.fromVersion);
    return redirect(`/labs/${lab.id}/protocols/${protocolId}/versions/${created.version}`);
  } catch (error) {
    if (error instanceof UserFacingError) {
      if (error.status === 404) throw data(error.message, { status: 404 });
      return data({ error: error.message }, { status: error.status });
    }
    throw error;
  }
}

export default function ProtocolPage({ loaderData, actionData }: Route.ComponentProps) {
  const { formatDateTime } = useLabDates();
  const { lab, canWrite, protocolId, name, versions, hasDraft } = loaderData;
  const base = `/labs/${lab.id}/protocols/${protocolId}`;
  const newest = versions[0]?.version;
  const previous = versions[1]?.version;
  return (
    <div>
      <p className="mb-2">
        <Link to={`/labs/${lab.id}/protocols`}>← Protocols</Link>
      </p>
      <PageTitle lead="Each version is a draft until it is published; a published version is frozen and carries the hash of its content.">{name}</PageTitle>
      <FormAlert message={actionData?.error} />
      <table className="w-full border-collapse text-left">
        <thead>
          <tr className="border-b-2 border-graphite-800">
            <th scope="col" className="py-2">Version</th>
            <th scope="col" className="py-2">State</th>
            <th scope="col" className="py-2">Published</th>
            <th scope="col" className="py-2">Content hash (SHA-256)</th>
            <th scope="col" className="py-2"><span className="sr-only">Actions</span></th>
          </tr>
        </thead>
        <tbody>
          {versions.map((v) => (
            <tr key={v.id} className="border-b border-rule align-middle" data-version={v.version}>
              <td className="figures py-2 font-bold">
                {v.version}
                {v.basedOnVersion ? <span className="block text-sm font-normal text-graphite-600">from version {v.basedOnVersion}</span> : null}
              </td>
              <td className="py-2"><StateBadge state={v.state} /></td>
              <td className="figures py-2">{v.publishedAt ? formatDateTime(v.publishedAt) : "—"}</td>
              <td className="py-2 font-mono text-sm" title={v.contentHash ?? undefined}>{shortHash(v.contentHash)}</td>
              <td className="flex flex-wrap gap-2 py-2">
                <Link to={`${base}/versions/${v.version}`} className="inline-flex min-h-target items-center rounded border border-graphite-400 bg-card px-3 font-bold no-underline">
                  {v.state === "draft" && canWrite ? "Edit" : "Read"}
                </Link>
                <Link to={`${base}/versions/${v.version}/print`} className="inline-flex min-h-target items-center rounded border border-graphite-400 bg-card px-3 font-bold no-underline">
                  Bench page
                </Link>
                {canWrite && v.state === "published" && !hasDraft ? (
                  <Form method="post">
                    <input type="hidden" name="fromVersion" value={v.version} />
                    <SubmitButton intent="new-draft" tone="quiet">New draft from this</SubmitButton>
                  </Form>
                ) : null}
              </td>
            </tr>
          ))}
        </tbody>
      </table>

      {versions.length > 1 ? (
        <Form method="get" action={`${base}/compare`} className="mt-8 flex flex-wrap items-end gap-3">
          <h2 className="w-full text-xl font-bold">Compare two versions</h2>
          <VersionSelect name="a" label="Version" versions={versions} defaultValue={previous} />
          <VersionSelect name="b" label="with version" versions={versions} defaultValue={newest} />
          <SubmitButton tone="quiet">Compare</SubmitButton>
        </Form>
      ) : null}
    </div>
  );
}

function VersionSelect({ name, label, versions, defaultValue }: { name: string; label: string; versions: { version: number; state: string }[]; defaultValue?: number }) {
  return (
    <label className="flex flex-col gap-1 font-bold">
      {label}
      <select name={name} defaultValue={defaultValue} className="min-h-target rounded border border-graphite-400 bg-card px-3 font-normal">
        {versions.map((v) => (
          <option key={v.version} value={v.version}>
            {v.version} ({v.state})
          </option>
        ))}
      </select>
    </label>
  );
}
