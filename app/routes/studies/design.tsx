import { Link, data, redirect } from "react-router";
import { z } from "zod";
import { studyOfLab } from "~/server/analysis/access.server.ts";
import type { Route } from "./+types/design";
import { FormAlert, PageTitle } from "~/components/form.tsx";
import { StudyStateBadge } from "~/components/study-state.tsx";
import { ProblemList, StudySteps } from "~/components/study-steps.tsx";
import { DesignerStep } from "~/components/study-designer-steps.tsx";
import { MANAGERS, notFound, requireLabRole } from "~/server/access.server.ts";
import {
  addArm,
  bladeRefusal,
  enrolBlade,
  getDesigner,
  moveBlade,
  refusalResponse,
  removeArm,
  saveAnalysisPlan,
  saveOutcomes,
  savePeople,
  saveProtocolAndDesign,
  saveQuestion,
  saveRandomizationSettings,
  setEnrolment,
  studyIdParam,
  testerRefusal,
  unenrolBlade,
  updateArm,
} from "~/server/studies/designer.server.ts";
import { formFailure, parseForm } from "~/lib/forms.ts";
import {
  AnalysisSchema,
  ArmSchema,
  EnrolSchema,
  OutcomesSchema,
  PeopleSchema,
  ProtocolStepSchema,
  QuestionSchema,
  RandomizationSchema,
  STEP_IDS,
  STEP_LABELS,
  recipeFromForm,
  type StepId,
} from "~/lib/study-input.ts";
import { readFormData } from "~/server/form-data.server.ts";
import type { ProtocolContent } from "~/domain/protocol.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data ? STEP_LABELS[data.step] : "Design"} · ${data?.study.shortName ?? "Study"} · Blindcut` }];

const StepParam = z.enum(STEP_IDS);

function stepParam(raw: string | undefined): StepId {
  const parsed = StepParam.safeParse(raw);
  if (!parsed.success) notFound();
  return parsed.data;
}

const hrcMean = (values: number[]) => (values.length ? `${(values.reduce((a, b) => a + b, 0) / values.length).toFixed(1)} HRC` : "no hardness");

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, MANAGERS);
  const studyId = studyIdParam(params.studyId);
  const step = stepParam(params.step);
  const d = await getDesigner(lab.id, studyId);
  if (!d) throw data("This study does not exist, or it belongs to another lab.", { status: 404 });
  const content = d.protocol ? (d.protocol.content as ProtocolContent) : null;
  const placeOf = new Map(d.enrolled.map((e) => [e.bladeId, e.armId ?? "study"]));
  return {
    lab,
    step,
    study: d.study,
    steps: d.steps,
    problems: d.problems,
    arms: d.arms.map((a) => ({ id: a.id, name: a.name, description: a.description, recipe: (a.sharpeningRecipe as ProtocolContent["sharpening"] | null) ?? null })),
    protocol: d.protocol && content ? { id: d.protocol.id, name: content.name, version: d.protocol.version, kind: content.measurementKind, sharpening: content.sharpening, replicates: content.replicatesPerBlade } : null,
    published: d.published.map((p) => ({ id: p.id, label: `${p.name} — version ${p.version}`, kind: (p.content as ProtocolContent).measurementKind })),
    blades: d.library.map((b) => ({
      id: b.id,
      inventoryNumber: b.inventoryNumber,
      detail: [b.steel, hrcMean(b.hardnessHrc), b.edgeFinish].filter(Boolean).join(" · "),
      status: b.status,
      refusal: bladeRefusal(b.status),
      place: placeOf.get(b.id) ?? "library",
    })),
    members: d.members.map((m) => ({ userId: m.userId, name: m.name, email: m.email, role: m.role, refusal: testerRefusal(m.role) })),
    testerIds: d.testers.map((t) => t.userId),
    testerCount: d.testerCount,
    sharpeningDiffers: d.sharpeningDiffers,
    editable: d.study.state === "draft",
  };
}

type Result = { ok: true; message: string } | { ok: false; errors: Record<string, string>; values: Record<string, string>; formError?: string; problems?: string[] };

function next(labId: string, studyId: string, step: StepId) {
  const i = STEP_IDS.indexOf(step);
  return redirect(i + 1 < STEP_IDS.length ? `/labs/${labId}/studies/${studyId}/design/${STEP_IDS[i + 1]}` : `/labs/${labId}/studies/${studyId}/randomize`);
}

export async function action({ request, params }: Route.ActionArgs) {
  const { lab } = await requireLabRole(request, params.labId, MANAGERS);
  const studyId = studyIdParam(params.studyId);
  const step = stepParam(params.step);
  // Another lab's study is 404 before the input is read.
  if (!(await studyOfLab(lab.id, studyId))) throw data("This study does not exist, or it belongs to another lab.", { status: 404 });
  const form = await readFormData(request);
  const intent = String(form.get("intent") ?? "save");
  const values: Record<string, string> = {};
  for (const [k, v] of form) if (typeof v === "string") values[k] = v;
  const fail = (status: number, errors: Record<string, string>, formError?: string) => data<Result>(formFailure(values, errors, formError), { status });
  const parse = <S extends z.ZodType>(schema: S, source: FormData = form) => parseForm(schema, source);

  try {
    if (step === "question") {
      const p = parse(QuestionSchema);
      if (!p.ok) return fail(400, p.errors, "Check the marked fields.");
      await saveQuestion(lab.id, studyId, p.data);
      return next(lab.id, studyId, step);
    }
    if (step === "protocol") {
      const p = parse(ProtocolStepSchema);
      if (!p.ok) return fail(400, p.errors, "Check the marked fields.");
      await saveProtocolAndDesign(lab.id, studyId, p.data);
      return next(lab.id, studyId, step);
    }
    if (step === "outcomes") {
      const p = parse(OutcomesSchema);
      if (!p.ok) return fail(400, p.errors, "Check the marked fields.");
      await saveOutcomes(lab.id, studyId, p.data);
      return next(lab.id, studyId, step);
    }
    if (step === "arms") {
      if (intent === "continue") return next(lab.id, studyId, step);
      if (intent === "remove-arm") {
        const armId = studyIdParam(String(form.get("armId") ?? ""));
        await removeArm(lab.id, studyId, armId);
        return data<Result>({ ok: true, message: "Removed." });
      }
      if (intent !== "add-arm" && intent !== "update-arm") return fail(400, {}, "Unknown action.");
      const raw = { name: form.get("name") ?? undefined, description: form.get("description") ?? "", recipeMode: form.get("recipeMode") ?? "protocol", recipe: recipeFromForm(form) };
      const p = ArmSchema.safeParse(raw);
      if (!p.success) {
        const errors: Record<string, string> = {};
        for (const issue of p.error.issues) errors[issue.path.join(".") || "_form"] ??= issue.message;
        return fail(400, errors, "Check the marked fields.");
      }
      if (intent === "add-arm") await addArm(lab.id, studyId, p.data);
      else await updateArm(lab.id, studyId, studyIdParam(String(form.get("armId") ?? "")), p.data);
      return data<Result>({ ok: true, message: intent === "add-arm" ? `Added “${p.data.name}”.` : `Saved “${p.data.name}”.` });
    }
    if (step === "blades") {
      if (intent === "continue") return next(lab.id, studyId, step);
      if (intent === "set-enrolment") {
        const choice = new Map<string, string | null>();
        for (const [k, v] of form) {
          const m = /^blade\.([0-9a-f-]{36})$/i.exec(k);
          // Only the rows the person changed: a row left as it was never undoes a drag made meanwhile.
          if (m && typeof v === "string" && form.get(`was.${m[1]}`) !== v) choice.set(m[1], v === "" ? null : v);
        }
        await setEnrolment(lab.id, studyId, choice);
        return data<Result>({ ok: true, message: "Enrolment saved." });
      }
      if (intent === "unenrol") {
        const p = parse(EnrolSchema);
        if (!p.ok) return fail(400, p.errors, p.errors.bladeId ?? "Choose a blade.");
        await unenrolBlade(lab.id, studyId, p.data.bladeId);
        return data<Result>({ ok: true, message: "Taken out of the study." });
      }
      if (intent === "enrol" || intent === "move") {
        const source = new FormData();
        source.set("bladeId", String(form.get("bladeId") ?? ""));
        const armId = String(form.get("armId") ?? "");
        source.set("armId", armId === "study" ? "" : armId);
        const p = parse(EnrolSchema, source);
        if (!p.ok) return fail(400, p.errors, Object.values(p.errors)[0]);
        if (intent === "enrol") await enrolBlade(lab.id, studyId, p.data.bladeId, p.data.armId);
        else await moveBlade(lab.id, studyId, p.data.bladeId, p.data.armId);
        return data<Result>({ ok: true, message: "Enrolled." });
      }
      return fail(400, {}, "Unknown action.");
    }
    if (step === "analysis") {
      const p = parse(AnalysisSchema);
      if (!p.ok) return fail(400, p.errors, "Check the marked fields.");
      await saveAnalysisPlan(lab.id, studyId, p.data);
      return next(lab.id, studyId, step);
    }
    if (step === "people") {
      const p = parse(PeopleSchema);
      if (!p.ok) return fail(400, p.errors, "Check the marked fields.");
      await savePeople(lab.id, studyId, p.data);
      return next(lab.id, studyId, step);
    }
    const p = parse(RandomizationSchema);
    if (!p.ok) return fail(400, p.errors, "Check the marked fields.");
    await saveRandomizationSettings(lab.id, studyId, p.data);
    return next(lab.id, studyId, step);
  } catch (error) {
    return refusalResponse(error, values);
  }
}

export default function DesignStep({ loaderData, actionData }: Route.ComponentProps) {
  const d = loaderData;
  const result = actionData as Result | undefined;
  const index = STEP_IDS.indexOf(d.step);
  return (
    <div>
      <p className="mb-2">
        <Link to={`/labs/${d.lab.id}/studies/${d.study.id}`}>← {d.study.shortName}</Link>
      </p>
      <PageTitle>
        <span className="figures text-graphite-600">Step {index + 1} of {STEP_IDS.length}:</span> {STEP_LABELS[d.step]} <StudyStateBadge state={d.study.state} />
      </PageTitle>
      <StudySteps labId={d.lab.id} studyId={d.study.id} steps={d.steps} current={d.step} />
      {!d.editable ? (
        <p className="mb-4 rounded border-2 border-graphite-800 p-3 font-bold">
          ■ This study is {d.study.state}: its design is frozen with its hash and can no longer be edited.
        </p>
      ) : null}
      {d.testerCount === 0 ? (
        <p className="mb-4 rounded border-l-4 border-signal bg-signal-soft p-3">
          <strong>{d.members.length <= 1 ? "A lab with one person cannot run a blinded study." : "This lab has no tester yet."}</strong> At least one member with the tester role is needed to randomize:
          owners and leads can open every key, so they cannot test blind. <Link to={`/labs/${d.lab.id}/invitations`}>Invite a tester</Link>.
        </p>
      ) : null}
      {result && !result.ok ? <FormAlert message={result.formError} /> : null}
      {result && result.ok ? <FormAlert tone="ok" message={result.message} /> : null}
      <div className="mt-4">
        <DesignerStep data={d} result={result} />
      </div>
      <div className="mt-8">
        <ProblemList problems={d.problems} />
      </div>
    </div>
  );
}
