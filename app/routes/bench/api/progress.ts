import type { Route } from "./+types/progress";
import { MANAGERS, notFound, requireLabRole, isUuid } from "~/server/access.server.ts";
import { jsonRoute } from "~/server/bench/api.server.ts";
import { studyOfLab, studyProgress } from "~/server/bench/leads.server.ts";

// GET progress per tester and sitting, for the lead's page to refresh itself. No outcomes, no arms.
export async function loader({ request, params }: Route.LoaderArgs) {
  return jsonRoute(async () => {
    const { lab } = await requireLabRole(request, params.labId, MANAGERS);
    const study = isUuid(params.studyId) ? await studyOfLab(lab.id, params.studyId) : null;
    if (!study) notFound();
    return Response.json({ study: { id: study.id, shortName: study.shortName, state: study.state }, ...(await studyProgress(lab.id, study.id)) }, { headers: { "Cache-Control": "no-store" } });
  });
}
