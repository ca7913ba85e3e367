import type { Route } from "./+types/state";
import { jsonRoute } from "~/server/bench/api.server.ts";
import { requireBenchRun, runStateJson } from "~/server/bench/runs.server.ts";
import { db } from "~/server/db.server.ts";

// GET the run's state as the server decides it: state, attempt, the stop rule's decision, the readings.
export async function loader({ request, params }: Route.LoaderArgs) {
  return jsonRoute(async () => {
    const { lab, runId } = await requireBenchRun(request, params.labId, params.runId, { write: false });
    return Response.json(await runStateJson(db(), lab.id, runId), { headers: { "Cache-Control": "no-store" } });
  });
}
