import type { Route } from "./+types/reference-readings-csv";
import { MANAGERS, requireLabRole } from "~/server/access.server.ts";
import { referenceReadingsCsv } from "~/server/quality.server.ts";
import { csvResponse } from "~/server/analysis/csv-response.server.ts";

// Readings of every reference run of the lab; analysts get reference codes only, never inventory numbers.
export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab, role } = await requireLabRole(request, params.labId, ["owner", "lead", "analyst"]);
  return csvResponse(await referenceReadingsCsv(lab.id, { withInventory: MANAGERS.includes(role) }), "reference-run-readings.csv");
}
