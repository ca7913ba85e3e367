import type { Route } from "./+types/corrections";
import { jsonError, jsonRoute, readJson, zodIssues } from "~/server/bench/api.server.ts";
import { requireBenchRun } from "~/server/bench/runs.server.ts";
import { CorrectionInput, correctReading } from "~/server/bench/readings.server.ts";

// POST a correction: { idempotencyKey, readingId, value, reason }: a new reading superseding the old one.
export async function action({ request, params }: Route.ActionArgs) {
  return jsonRoute(async () => {
    const { user, lab, runId } = await requireBenchRun(request, params.labId, params.runId, { write: true });
    const parsed = CorrectionInput.safeParse(await readJson(request));
    if (!parsed.success) return jsonError("The correction could not be read: see the issues.", 400, zodIssues(parsed.error));
    const result = await correctReading({ labId: lab.id, runId, userId: user.id }, parsed.data);
    return Response.json(result, { status: result.replay ? 200 : 201, headers: { "Cache-Control": "no-store" } });
  });
}

export function loader() {
  return jsonError("POST a correction as JSON", 405);
}
