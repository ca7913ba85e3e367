import type { Route } from "./+types/photo";
import { notFound, isUuid } from "~/server/access.server.ts";
import { requireBenchRun } from "~/server/bench/runs.server.ts";
import { benchPhoto } from "~/server/bench/events.server.ts";
import { fileResponse } from "~/server/files.server.ts";

// An edge photo of a run, served through the app to the run's tester (or a lead), never from a public URL.
export async function loader({ request, params }: Route.LoaderArgs) {
  const { user, lab, runId, isTester } = await requireBenchRun(request, params.labId, params.runId, { write: false });
  const file = isUuid(params.fileId) ? await benchPhoto(lab.id, runId, params.fileId, user.id, isTester) : null;
  if (!file) notFound();
  return fileResponse(file);
}
