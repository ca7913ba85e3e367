import { Link } from "react-router";
import { formatDate } from "~/lib/dates.ts";
import type { QualityNotice } from "~/server/quality.server.ts"; // type only

/** Reference-chart signals on a lot or instrument this study used afterwards; names no arm or blade. */
export function QualityNotices({ labId, notices }: { labId: string; notices: QualityNotice[] }) {
  if (!notices.length) return null;
  return (
    <section role="note" aria-labelledby="quality-notices-h" data-testid="quality-notices" className="rounded-lg border-2 border-graphite-950 bg-card p-4">
      <h2 id="quality-notices-h" className="font-bold">
        <span aria-hidden="true">▲ </span>Reference runs out of control
      </h2>
      <ul className="mt-2 list-disc space-y-1 pl-6">
        {notices.map((n) => (
          <li key={`${n.at}/${n.rule}/${n.outcome}`}>
            A reference run on lot {n.lot} (instrument {n.instrument}) was out of control on {formatDate(n.at)} ({n.outcome}: {n.rule}); {n.runsAfter} run(s) of this study used the same{" "}
            {n.matchedBy.join(" and ")} afterwards.
          </li>
        ))}
      </ul>
      <p className="mt-2 text-sm text-graphite-800">
        Consider a sensitivity analysis without those runs. The signal rules and charts are on the <Link to={`/labs/${labId}/quality`} className="underline">quality page</Link>.
      </p>
    </section>
  );
}
