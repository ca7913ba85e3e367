import type { Route } from "./+types/photos";
import { BenchError, jsonError, jsonRoute } from "~/server/bench/api.server.ts";
import { requireBenchRun } from "~/server/bench/runs.server.ts";
import { receiveImage, UploadError } from "~/server/files.server.ts";
import { photoUrl } from "~/server/bench/events.server.ts";
import { db } from "~/server/db.server.ts";
import { runs } from "~/server/db/schema/index.ts";
import { eq } from "drizzle-orm";

// POST an edge photo (multipart, field "file") for this run: stored through the storage layer.
// Answers the file id and the bench URL that serves it back; never the storage key.
export async function action({ request, params }: Route.ActionArgs) {
  return jsonRoute(async () => {
    const { user, lab, runId } = await requireBenchRun(request, params.labId, params.runId, { write: true });
    const [run] = await db().select({ state: runs.state }).from(runs).where(eq(runs.id, runId));
    if (run?.state !== "in_progress") throw new BenchError("Photos are taken while the run is in progress.", 409);
    try {
      const stored = await receiveImage(request, lab.id, user.id);
      return Response.json({ fileId: stored.fileId, url: photoUrl(lab.id, runId, stored.fileId), contentType: stored.contentType, byteSize: stored.byteSize });
    } catch (error) {
      if (error instanceof UploadError) return jsonError(error.message, error.status);
      throw error;
    }
  });
}

export function loader() {
  return jsonError("POST a photo as multipart/form-data with the field 'file'", 405);
}
