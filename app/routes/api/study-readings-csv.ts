import type { Route } from "./+types/study-readings-csv";
import { closedAnalysis, requireStudyForResults } from "~/server/analysis/access.server.ts";
import { readingsCsv } from "~/server/analysis/exports.server.ts";
import { csvResponse } from "~/server/analysis/csv-response.server.ts";

// Raw readings of a closed study in long form; arm names only after unblinding.
export async function loader({ request, params }: Route.LoaderArgs) {
  const { record } = await requireStudyForResults(request, params.labId, params.studyId);
  closedAnalysis(record);
  return csvResponse(readingsCsv(record), `study-${record.study.id.slice(0, 8)}-readings.csv`);
}
