import type { Route } from "./+types/readings";
import { jsonError, jsonRoute, readJson, zodIssues } from "~/server/bench/api.server.ts";
import { requireBenchRun } from "~/server/bench/runs.server.ts";
import { ReadingInput, saveReading } from "~/server/bench/readings.server.ts";

// POST one reading: { idempotencyKey, attempt?, cut, position, kind, value }.
// 201 with the stored reading and the server's decision; 200 with the same reading for a repeated key.
export async function action({ request, params }: Route.ActionArgs) {
  return jsonRoute(async () => {
    const { user, lab, runId } = await requireBenchRun(request, params.labId, params.runId, { write: true });
    const parsed = ReadingInput.safeParse(await readJson(request));
    if (!parsed.success) return jsonError("The reading could not be read: see the issues.", 400, zodIssues(parsed.error));
    const result = await saveReading({ labId: lab.id, runId, userId: user.id }, parsed.data);
    return Response.json(result, { status: result.replay ? 200 : 201, headers: { "Cache-Control": "no-store" } });
  });
}

export function loader() {
  return jsonError("POST a reading as JSON", 405);
}
