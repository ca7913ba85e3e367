import type { Route } from "./+types/import";
import { jsonError, jsonRoute, readJson, zodIssues } from "~/server/bench/api.server.ts";
import { requireBenchRun } from "~/server/bench/runs.server.ts";
import { ImportInput, importReadings } from "~/server/bench/readings.server.ts";

// POST { csv, layout: "blindcut" | "mapped", mapping?, commit }: a preview with row errors,
// or (commit: true) every row stored in one transaction, or none.
export async function action({ request, params }: Route.ActionArgs) {
  return jsonRoute(async () => {
    const { user, lab, runId } = await requireBenchRun(request, params.labId, params.runId, { write: true });
    const parsed = ImportInput.safeParse(await readJson(request));
    if (!parsed.success) return jsonError("The import could not be read: see the issues.", 400, zodIssues(parsed.error));
    const result = await importReadings({ labId: lab.id, runId, userId: user.id }, parsed.data);
    if (parsed.data.commit && !result.committed) {
      return Response.json({ error: "Nothing was imported: fix the rows listed and try again.", issues: result.errors.map((e) => ({ path: `row ${e.row}${e.column ? ` ${e.column}` : ""}`, message: e.message })), preview: result }, { status: 422 });
    }
    return Response.json(result, { headers: { "Cache-Control": "no-store" } });
  });
}

export function loader() {
  return jsonError("POST the CSV as JSON", 405);
}
