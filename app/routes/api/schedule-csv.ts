import type { Route } from "./+types/schedule-csv";
import { MANAGERS, requireLabRole } from "~/server/access.server.ts";
import { studyIdParam, throwRefusal } from "~/server/studies/designer.server.ts";
import { scheduleCsv } from "~/server/studies/schedule.server.ts";

// The schedule as CSV, one row per run, for the lead: it is the key (codes with their blades and arms).
export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, MANAGERS);
  const studyId = studyIdParam(params.studyId);
  const { study, csv } = await scheduleCsv(lab.id, studyId).catch(throwRefusal);
  const name = study.shortName.replace(/[^a-zA-Z0-9]+/g, "-").replace(/^-|-$/g, "").toLowerCase() || "study";
  return new Response(csv, {
    headers: {
      "Content-Type": "text/csv; charset=utf-8",
      "Content-Disposition": `attachment; filename="schedule-key-${name}.csv"`,
      "Cache-Control": "no-store",
    },
  });
}
