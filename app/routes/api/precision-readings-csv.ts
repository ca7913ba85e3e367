import type { Route } from "./+types/precision-readings-csv";
import { MANAGERS, isUuid, notFound, requireLabRole } from "~/server/access.server.ts";
import { precisionReadingsCsv } from "~/server/quality.server.ts";
import { csvResponse } from "~/server/analysis/csv-response.server.ts";

// Readings of the repeatability studies on one instrument; analysts get edges by place, not inventory number.
export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab, role } = await requireLabRole(request, params.labId, ["owner", "lead", "analyst"]);
  const body = isUuid(params.instrumentId) ? await precisionReadingsCsv(lab.id, params.instrumentId, { withInventory: MANAGERS.includes(role) }) : null;
  if (body === null) notFound();
  return csvResponse(body, `instrument-${params.instrumentId.slice(0, 8)}-repeatability-readings.csv`);
}
