import type { Route } from "./+types/blades-export";
import { MANAGERS, requireLabRole } from "~/server/access.server.ts";
import { allMatchingBlades, BLADE_SORTS, bladesToCsv } from "~/server/library.server.ts";
import { parseTableQuery } from "~/lib/table-query.ts";

// The blade table as filtered and sorted on screen, as CSV (every page).
export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, MANAGERS);
  const query = parseTableQuery(new URL(request.url), BLADE_SORTS, { sort: "inventoryNumber" }, ["status", "steel"]);
  const csv = bladesToCsv(await allMatchingBlades(lab.id, query));
  return new Response(csv, {
    headers: {
      "Content-Type": "text/csv; charset=utf-8",
      "Content-Disposition": `attachment; filename="blades-${new Date().toISOString().slice(0, 10)}.csv"`,
      "Cache-Control": "no-store",
    },
  });
}
