import type { Route } from "./+types/study-bundle";
import { closedAnalysis, requireStudyForResults } from "~/server/analysis/access.server.ts";
import { buildBundle } from "~/server/analysis/exports.server.ts";

// The reproducibility bundle (docs/bundle.schema.json); `npm run reanalyze -- <file>` re-runs its analysis.
export async function loader({ request, params }: Route.LoaderArgs) {
  const { record } = await requireStudyForResults(request, params.labId, params.studyId);
  const bundle = buildBundle(record, closedAnalysis(record));
  return new Response(JSON.stringify(bundle, null, 2), {
    headers: {
      "Content-Type": "application/json; charset=utf-8",
      "Content-Disposition": `attachment; filename="study-${record.study.id.slice(0, 8)}-bundle.json"`,
      "Cache-Control": "private, no-store",
    },
  });
}
