import { Form, data, redirect } from "react-router";
import type { Route } from "./+types/new";
import { Field, FormAlert, PageTitle, SubmitButton } from "~/components/form.tsx";
import { MANAGERS, requireLabRole } from "~/server/access.server.ts";
import { createDraftStudy } from "~/server/studies/designer.server.ts";
import { parseForm } from "~/lib/forms.ts";
import { DESIGN_LABELS, NewStudySchema, STUDY_DESIGNS } from "~/lib/study-input.ts";
import { readFormData } from "~/server/form-data.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "New study · Blindcut" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, MANAGERS);
  return { lab };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { lab, user } = await requireLabRole(request, params.labId, MANAGERS);
  const parsed = parseForm(NewStudySchema, await readFormData(request));
  if (!parsed.ok) return data(parsed, { status: 400 });
  const study = await createDraftStudy(user, lab.id, parsed.data);
  return redirect(`/labs/${lab.id}/studies/${study.id}/design/question`);
}

export default function NewStudy({ actionData }: Route.ComponentProps) {
  const errors: Record<string, string> = actionData && !actionData.ok ? actionData.errors : {};
  const values: Record<string, string> = actionData && !actionData.ok ? actionData.values : {};
  const chosen = values.design ?? "parallel";
  return (
    <div className="max-w-2xl">
      <PageTitle lead="A study starts as a draft. Every step can be left and resumed until you randomize it.">New study</PageTitle>
      <Form method="post" className="flex flex-col gap-5" noValidate>
        <FormAlert message={actionData && !actionData.ok ? actionData.formError : undefined} />
        <Field
          label="Short name"
          name="shortName"
          defaultValue={values.shortName}
          error={errors.shortName}
          hint="Shown to testers and printed on every label: say nothing about the arms, the steels or the blades."
        />
        <fieldset className="flex flex-col gap-2">
          <legend className="mb-1 font-bold">Design</legend>
          {STUDY_DESIGNS.map((d) => (
            <label key={d} className="flex min-h-target cursor-pointer items-start gap-3 rounded border border-rule bg-card p-3 has-[:checked]:border-2 has-[:checked]:border-ink">
              <input type="radio" name="design" value={d} defaultChecked={d === chosen} className="mt-1 h-5 w-5 accent-ink" />
              <span>
                <span className="block font-bold">{DESIGN_LABELS[d].title}</span>
                <span className="text-graphite-600">{DESIGN_LABELS[d].text}</span>
              </span>
            </label>
          ))}
          {errors.design ? <p className="text-sm font-bold text-fault">{errors.design}</p> : null}
        </fieldset>
        <SubmitButton>Create the draft</SubmitButton>
      </Form>
    </div>
  );
}
