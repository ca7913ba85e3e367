import type { Route } from "./+types/study-analysis";
import { closedAnalysis, requireStudySummaryForResults } from "~/server/analysis/access.server.ts";
import { armNames, chartData } from "~/server/analysis/results.server.ts";

// The numbers the results charts draw; arm names only after unblinding.
export async function loader({ request, params }: Route.LoaderArgs) {
  const { record } = await requireStudySummaryForResults(request, params.labId, params.studyId);
  if (record.study.state !== "closed" && record.study.state !== "unblinded") {
    return Response.json({ error: "The study is not closed yet: results are read after closing." }, { status: 409 });
  }
  return Response.json(chartData(closedAnalysis(record), armNames(record)), { headers: { "Cache-Control": "private, no-store" } });
}
