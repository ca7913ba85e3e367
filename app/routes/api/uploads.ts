import type { Route } from "./+types/uploads";
import { MANAGERS, requireLabRole } from "~/server/access.server.ts";
import { receiveImage, UploadError } from "~/server/files.server.ts";

// POST a photo (multipart, field "file"): stored through the S3 layer; answers its file id as JSON.
export async function action({ request, params }: Route.ActionArgs) {
  const { lab, user } = await requireLabRole(request, params.labId, MANAGERS);
  try {
    const stored = await receiveImage(request, lab.id, user.id);
    return Response.json(stored);
  } catch (error) {
    if (error instanceof UploadError) return Response.json({ error: error.message }, { status: error.status });
    throw error;
  }
}

export function loader() {
  return Response.json({ error: "POST a photo as multipart/form-data with the field 'file'" }, { status: 405 });
}
