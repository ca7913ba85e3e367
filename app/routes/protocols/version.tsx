import { Link, data, redirect } from "react-router";
import { useLabDates } from "~/lib/use-lab-dates.ts";
import type { Route } from "./+types/version";
import { PageTitle } from "~/components/form.tsx";
import { ProtocolEditor } from "~/components/protocol-editor.tsx";
import { ProtocolRecord, StateBadge } from "~/components/protocol-view.tsx";
import { ALL_ROLES, MANAGERS, requireLabRole } from "~/server/access.server.ts";
import { UserFacingError } from "~/server/accounts.server.ts";
import {
  canWriteProtocols,
  forbidDrafts,
  getVersion,
  mediaChoices,
  mediumNames,
  ProtocolContentError,
  protocolIdParam,
  requireProtocolOfLab,
  saveDraftAndMaybePublish,
  sharpnessTesterHints,
  versionParam,
} from "~/server/protocols.server.ts";
import { readFormData } from "~/server/form-data.server.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.content.name ?? "Protocol"} · version ${data?.version ?? ""} · Blindcut` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab, role } = await requireLabRole(request, params.labId, ALL_ROLES);
  const protocolId = protocolIdParam(params.protocolId);
  const version = versionParam(params.version);
  const canWrite = canWriteProtocols(role);
  const row = await getVersion(lab.id, protocolId, version).catch(rethrow);
  if (row.state === "draft" && !canWrite) forbidDrafts();
  const editing = row.state === "draft" && canWrite;
  const names = await mediumNames(lab.id, [row.content.medium.mediumId]);
  return {
    lab,
    protocolId,
    version,
    state: row.state,
    editing,
    content: row.content,
    contentHash: row.contentHash,
    publishedAt: row.publishedAt?.toISOString() ?? null,
    updatedAt: row.updatedAt.toISOString(),
    mediumName: row.content.medium.mediumId ? (names.get(row.content.medium.mediumId) ?? null) : null,
    media: editing ? await mediaChoices(lab.id) : [],
    testerHints: editing ? await sharpnessTesterHints(lab.id) : [],
  };
}

function rethrow(error: unknown): never {
  if (error instanceof UserFacingError) throw data(error.message, { status: error.status });
  throw error;
}

type ActionResult = { errors: Record<string, string>; formError?: string; saved?: string };

export async function action({ request, params }: Route.ActionArgs) {
  const { lab, user } = await requireLabRole(request, params.labId, MANAGERS);
  const protocolId = protocolIdParam(params.protocolId);
  const version = versionParam(params.version);
  await requireProtocolOfLab(lab.id, protocolId).catch(() => {
    throw data("Not found", { status: 404 });
  });
  const form = await readFormData(request);
  const intent = form.get("intent");
  if (intent !== "save" && intent !== "publish") return data<ActionResult>({ errors: {}, formError: "Unknown action: reload the page and try again." }, { status: 400 });
  const raw = form.get("content");
  let input: unknown;
  try {
    input = JSON.parse(typeof raw === "string" ? raw : "");
  } catch {
    return data<ActionResult>({ errors: {}, formError: "The form could not be read: reload the page and try again." }, { status: 400 });
  }
  try {
    await saveDraftAndMaybePublish(user, lab.id, protocolId, version, input, intent === "publish");
  } catch (error) {
    if (error instanceof ProtocolContentError) return data<ActionResult>({ errors: error.errors }, { status: 400 });
    if (error instanceof UserFacingError) {
      if (error.status === 404) throw data(error.message, { status: 404 });
      return data<ActionResult>({ errors: {}, formError: error.message }, { status: error.status });
    }
    throw error;
  }
  if (intent === "publish") return redirect(`/labs/${lab.id}/protocols/${protocolId}/versions/${version}`);
  return data<ActionResult>({ errors: {}, saved: `Draft saved at ${new Date().toISOString().slice(11, 16)} UTC.` });
}

export default function VersionPage({ loaderData, actionData }: Route.ComponentProps) {
  const { formatDateTime } = useLabDates();
  const d = loaderData;
  const base = `/labs/${d.lab.id}/protocols/${d.protocolId}`;
  return (
    <div>
      <p className="mb-2">
        <Link to={base}>← All versions of this protocol</Link>
      </p>
      <PageTitle
        lead={
          d.editing
            ? "A draft: change anything, save, and publish when it is ready. Publishing freezes this version."
            : d.state === "published"
              ? "Published and frozen. To change it, start a new draft version from the protocol's page."
              : "A draft, not yet published."
        }
      >
        {d.content.name} <span className="figures text-graphite-600">· version {d.version}</span> <StateBadge state={d.state} />
      </PageTitle>
      <p className="mb-6 flex flex-wrap gap-3">
        <Link to={`${base}/versions/${d.version}/print`} className="inline-flex min-h-target items-center rounded border border-graphite-400 bg-card px-3 font-bold no-underline">
          Bench page
        </Link>
      </p>
      {d.editing ? (
        // A successful save remounts the editor with the stored (normalised) content.
        <ProtocolEditor
          key={d.updatedAt}
          content={d.content}
          media={d.media}
          testerHints={d.testerHints}
          errors={actionData?.errors ?? {}}
          formError={actionData?.formError}
          saved={actionData?.saved}
        />
      ) : (
        <>
          {d.contentHash ? (
            <p className="mb-4 rounded border border-rule bg-card p-3">
              <span className="font-bold">Content hash (SHA-256):</span> <code className="break-all" data-testid="content-hash">{d.contentHash}</code>
              {d.publishedAt ? <span className="block text-sm text-graphite-600">Published {formatDateTime(d.publishedAt)}</span> : null}
            </p>
          ) : null}
          <ProtocolRecord content={d.content} mediumName={d.mediumName} />
        </>
      )}
    </div>
  );
}

