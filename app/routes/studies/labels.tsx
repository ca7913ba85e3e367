import { Link } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/labels";
import { MANAGERS, requireLabRole } from "~/server/access.server.ts";
import { studyIdParam, throwRefusal } from "~/server/studies/designer.server.ts";
import { labelSheet } from "~/server/studies/schedule.server.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Labels · ${data?.shortName ?? "Study"} · Blindcut` }];

const Paper = z.enum(["a4", "letter"]).catch("a4");

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, MANAGERS);
  const studyId = studyIdParam(params.studyId);
  const paper = Paper.parse(new URL(request.url).searchParams.get("paper") ?? "a4");
  const sheet = await labelSheet(lab.id, studyId).catch(throwRefusal);
  return { labId: lab.id, studyId, paper, ...sheet };
}

// Printed: the app's header and footer and the controls are left out; labels never split across pages.
const printCss = (paper: "a4" | "letter") => `
@page { size: ${paper === "a4" ? "A4" : "letter"}; margin: ${paper === "a4" ? "10mm" : "0.4in"}; }
@media print {
  body > div > header, body > div > footer, [data-print-hide] { display: none !important; }
  html, body { background: #fff !important; }
  main { max-width: none !important; padding: 0 !important; }
  .label-grid { gap: 4mm !important; }
  .label { break-inside: avoid; page-break-inside: avoid; border-color: #17191b !important; }
}`;

export default function LabelSheet({ loaderData }: Route.ComponentProps) {
  const { labId, studyId, paper, shortName, labels } = loaderData;
  const base = `/labs/${labId}/studies/${studyId}`;
  return (
    <article>
      <style>{printCss(paper)}</style>
      <div data-print-hide className="mb-4 flex flex-col gap-3">
        <p>
          <Link to={base}>← Back to the study</Link>
        </p>
        <h1 className="text-3xl font-bold">Label sheet</h1>
        <p className="max-w-prose text-graphite-800">
          One label per blade: its blind code, a QR code of it, the study's short name and a box for the tester's initials. Nothing on a label says which blade or arm it is; the schedule CSV is the key. {labels.length} label{labels.length === 1 ? "" : "s"}.
        </p>
        <p className="flex flex-wrap items-center gap-3">
          <span className="font-bold">Paper:</span>
          <Link to="?paper=a4" aria-current={paper === "a4" ? "page" : undefined} className={`inline-flex min-h-target items-center rounded border px-3 font-bold no-underline ${paper === "a4" ? "border-2 border-ink" : "border-graphite-400"}`}>
            A4
          </Link>
          <Link to="?paper=letter" aria-current={paper === "letter" ? "page" : undefined} className={`inline-flex min-h-target items-center rounded border px-3 font-bold no-underline ${paper === "letter" ? "border-2 border-ink" : "border-graphite-400"}`}>
            Letter
          </Link>
          <button type="button" onClick={() => window.print()} className="min-h-target rounded bg-ink px-4 font-bold text-white hover:bg-ink-deep">
            Print the labels
          </button>
        </p>
      </div>
      <ul className="label-grid grid grid-cols-2 gap-3 sm:grid-cols-3" data-testid="labels" data-paper={paper}>
        {labels.map((l) => (
          <li key={l.code} className="label flex items-center gap-3 rounded border-2 border-graphite-800 bg-white p-3" data-code={l.code}>
            <div className="h-24 w-24 shrink-0" aria-hidden="true" dangerouslySetInnerHTML={{ __html: l.qrSvg }} />
            <div className="min-w-0 flex-1">
              <p className="truncate text-sm text-graphite-800">{shortName}</p>
              <p className="figures text-2xl font-bold tracking-widest" aria-label={`Blind code ${l.code.split("").join(" ")}`}>
                {l.code}
              </p>
              <p className="mt-2 flex items-end gap-2 text-sm">
                Initials <span className="inline-block h-7 flex-1 border-b-2 border-graphite-800" />
              </p>
            </div>
          </li>
        ))}
      </ul>
    </article>
  );
}
