import type { Route } from "./+types/file";
import { MANAGERS, notFound, requireLabRole, isUuid } from "~/server/access.server.ts";
import { fileOfLab, fileResponse } from "~/server/files.server.ts";

// Files are served through the app with the lab's access check, never from public URLs.
export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, MANAGERS);
  const file = isUuid(params.fileId) ? await fileOfLab(lab.id, params.fileId) : null;
  if (!file) notFound();
  return fileResponse(file);
}
