import type { Route } from "./+types/study-outcomes-csv";
import { closedAnalysis, requireStudyForResults } from "~/server/analysis/access.server.ts";
import { outcomesCsv } from "~/server/analysis/exports.server.ts";
import { csvResponse } from "~/server/analysis/csv-response.server.ts";

// Per-run outcomes of a closed study; arm names only after unblinding.
export async function loader({ request, params }: Route.LoaderArgs) {
  const { record } = await requireStudyForResults(request, params.labId, params.studyId);
  return csvResponse(outcomesCsv(record, closedAnalysis(record)), `study-${record.study.id.slice(0, 8)}-outcomes.csv`);
}
