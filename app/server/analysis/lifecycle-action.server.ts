import { data, redirect } from "react-router";
import { isUuid, notFound, requireLabRole } from "../access.server.ts";
import { readFormData } from "../form-data.server.ts";
import { studyOfLab } from "./access.server.ts";
import { closeStudy, LifecycleError, mailAnalysts, unblindStudy } from "./lifecycle.server.ts";

const STEPS = {
  close: { run: closeStudy, mail: "closed" as const },
  unblind: { run: unblindStudy, mail: "unblinded" as const },
};

/**
 * The action behind "Close the study" and "Unblind": leads and owners only; another lab's
 * study is 404 before the form is read; `confirmed` says what the form must hold, else a
 * 400 with `refusal`; analysts are e-mailed, and the lead lands on the results.
 */
export async function studyLifecycleAction(
  request: Request,
  params: { labId?: string; studyId?: string },
  step: keyof typeof STEPS,
  confirmed: (form: FormData) => boolean,
  refusal: string,
) {
  const { lab, user } = await requireLabRole(request, params.labId, ["owner", "lead"]);
  if (!isUuid(params.studyId) || !(await studyOfLab(lab.id, params.studyId))) notFound();
  const studyId = params.studyId;
  if (!confirmed(await readFormData(request))) return data({ error: refusal }, { status: 400 });
  try {
    const { study } = await STEPS[step].run(user.id, lab.id, studyId);
    await mailAnalysts(request, lab.id, studyId, study.shortName, STEPS[step].mail);
    return redirect(`/labs/${lab.id}/studies/${studyId}/results`);
  } catch (error) {
    if (error instanceof LifecycleError) {
      if (error.status === 404) notFound();
      return data({ error: error.message }, { status: error.status });
    }
    throw error;
  }
}
