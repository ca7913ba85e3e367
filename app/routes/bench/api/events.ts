import type { Route } from "./+types/events";
import { jsonError, jsonRoute, readJson, zodIssues } from "~/server/bench/api.server.ts";
import { requireBenchRun } from "~/server/bench/runs.server.ts";
import { EventInput, recordBenchEvent } from "~/server/bench/events.server.ts";

// POST an event at a cut: { idempotencyKey, kind: chip|rolled_edge|media_change|other, cut, note, photoFileId? }.
export async function action({ request, params }: Route.ActionArgs) {
  return jsonRoute(async () => {
    const { user, lab, runId } = await requireBenchRun(request, params.labId, params.runId, { write: true });
    const parsed = EventInput.safeParse(await readJson(request));
    if (!parsed.success) return jsonError("The event could not be read: see the issues.", 400, zodIssues(parsed.error));
    const result = await recordBenchEvent({ labId: lab.id, runId, userId: user.id }, parsed.data);
    return Response.json(result, { status: result.replay ? 200 : 201, headers: { "Cache-Control": "no-store" } });
  });
}

export function loader() {
  return jsonError("POST an event as JSON", 405);
}
