import { Link, data } from "react-router";
import type { Route } from "./+types/print";
import { cutMethodInWords, shortHash } from "~/components/protocol-view.tsx";
import { ALL_ROLES, requireLabRole } from "~/server/access.server.ts";
import { UserFacingError } from "~/server/accounts.server.ts";
import { canWriteProtocols, forbidDrafts, getVersion, mediumNames, protocolIdParam, versionParam } from "~/server/protocols.server.ts";
import { BENCH_CAUTIONS, MEASUREMENT_KIND_LABELS, SAFETY_DEFERENCE, stepInWords, stopRuleInWords } from "~/domain/protocol.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Bench page: ${data?.content.name ?? "protocol"} · Blindcut` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab, role } = await requireLabRole(request, params.labId, ALL_ROLES);
  const protocolId = protocolIdParam(params.protocolId);
  const version = versionParam(params.version);
  const row = await getVersion(lab.id, protocolId, version).catch((error: unknown) => {
    if (error instanceof UserFacingError) throw data(error.message, { status: error.status });
    throw error;
  });
  if (row.state === "draft" && !canWriteProtocols(role)) forbidDrafts();
  const names = await mediumNames(lab.id, [row.content.medium.mediumId]);
  return {
    lab,
    protocolId,
    version,
    state: row.state,
    content: row.content,
    contentHash: row.contentHash,
    mediumName: row.content.medium.mediumId ? (names.get(row.content.medium.mediumId) ?? null) : null,
  };
}

// The app's header and footer are not part of the printed page.
const PRINT_CSS = "@media print { body > div > header, body > div > footer, [data-print-hide] { display: none !important; } main { max-width: none !important; padding: 0 !important; } }";

export default function BenchPage({ loaderData }: Route.ComponentProps) {
  const { lab, protocolId, version, state, content, contentHash, mediumName } = loaderData;
  const f = content.edgeForce;
  return (
    <article className="mx-auto max-w-3xl text-lg">
      <style>{PRINT_CSS}</style>
      <p data-print-hide className="mb-4 flex flex-wrap gap-3">
        <Link to={`/labs/${lab.id}/protocols/${protocolId}/versions/${version}`}>← Back to the protocol</Link>
        <button
          type="button"
          onClick={() => window.print()}
          className="min-h-target rounded bg-ink px-4 font-bold text-white hover:bg-ink-deep"
        >
          Print this page
        </button>
      </p>
      {state === "draft" ? (
        <p className="mb-4 rounded border-2 border-dashed border-graphite-800 p-3 font-bold">
          □ DRAFT — not published; not for use in a study.
        </p>
      ) : null}
      <div className="border-b-2 border-graphite-800 pb-3">
        <h1 className="text-3xl font-bold">{content.name}</h1>
        <p className="figures text-graphite-800">
          Version {version}
          {contentHash ? <> · content hash {shortHash(contentHash)}</> : null}
        </p>
        <p className="text-graphite-800">{MEASUREMENT_KIND_LABELS[content.measurementKind]}</p>
      </div>

      <section aria-labelledby="cautions" className="my-5 rounded border-l-8 border-signal bg-signal-soft p-4">
        <h2 id="cautions" className="text-xl font-bold">
          <span aria-hidden="true">⚠ </span>Before you start: safety
        </h2>
        <ul className="mt-2 list-disc pl-6">
          {BENCH_CAUTIONS.map((c) => (
            <li key={c}>{c}</li>
          ))}
        </ul>
        <p className="mt-2 font-bold">{SAFETY_DEFERENCE}</p>
      </section>

      <section aria-labelledby="checklist" className="my-5">
        <h2 id="checklist" className="text-xl font-bold">Safety checklist (tick before the first cut)</h2>
        <ul className="mt-2 flex flex-col gap-2">
          {content.safetyChecklist.map((c, i) => (
            <li key={i} className="flex items-start gap-3">
              <span aria-hidden="true" className="mt-1 inline-block h-6 w-6 shrink-0 border-2 border-graphite-800" />
              {c}
            </li>
          ))}
        </ul>
      </section>

      <section aria-labelledby="setup" className="my-5">
        <h2 id="setup" className="text-xl font-bold">Set-up</h2>
        <ul className="mt-2 list-disc pl-6">
          <li>
            Medium: {mediumName ?? "as described"}
            {content.medium.description ? ` — ${content.medium.description}` : ""}
          </li>
          <li>Cut: {cutMethodInWords(content)}</li>
          <li>
            Edge length under test: <span className="figures">{content.edgeLengthMm}</span> mm (tape off the rest)
          </li>
          <li>
            Replicates per blade: <span className="figures">{content.replicatesPerBlade}</span>
          </li>
        </ul>
      </section>

      <section aria-labelledby="steps" className="my-5">
        <h2 id="steps" className="text-xl font-bold">Steps, in order</h2>
        <ol className="mt-2 list-decimal pl-6">
          <li>Confirm the blade's blind code. The protocol carries no blade identity; nor does this page.</li>
          <li>Tick the safety checklist above.</li>
          <li>
            Sharpen:
            <ol className="list-[lower-alpha] pl-6">
              {content.sharpening.map((s, i) => (
                <li key={i}>{stepInWords(s)}</li>
              ))}
            </ol>
          </li>
          {f ? (
            <>
              <li>
                Take the baseline readings before the first cut, at {f.positions.join(", ")} in that order.
              </li>
              <li>
                Cut, and after every {f.checkEveryCuts === 1 ? "cut" : <><span className="figures">{f.checkEveryCuts}</span> cuts</>} read the edge at {f.positions.join(", ")}.
              </li>
            </>
          ) : (
            <li>Load the card pack, start the machine and let it make its strokes; record the depth of card cut per stroke.</li>
          )}
          <li>Sheathe or rack the blade when the run ends.</li>
        </ol>
      </section>

      <section aria-labelledby="stop" className="my-5 rounded border-2 border-signal p-4">
        <h2 id="stop" className="text-xl font-bold">
          <span aria-hidden="true">■ </span>
          {f ? "Stop rule" : "End of the run"}
          {f ? <span className="figures text-signal"> · {f.thresholdGf} gf</span> : null}
        </h2>
        <p className="mt-2">{stopRuleInWords(content)}</p>
      </section>
    </article>
  );
}
