import { Form, data, redirect } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/new";
import { Field, FormAlert, PageTitle, SubmitButton } from "~/components/form.tsx";
import { MANAGERS, requireLabRole } from "~/server/access.server.ts";
import { createProtocol } from "~/server/protocols.server.ts";
import { parseForm } from "~/lib/forms.ts";
import { TEMPLATE_IDS, TEMPLATE_LABELS } from "~/domain/protocol.ts";
import { readFormData } from "~/server/form-data.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "New protocol · Blindcut" }];

const NewProtocolSchema = z.object({
  name: z.string({ error: "Give the protocol a name" }).trim().min(1, "Give the protocol a name").max(120, "Keep the name under 120 characters"),
  template: z.enum(TEMPLATE_IDS, { error: "Choose what to start from" }),
});

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, MANAGERS);
  return { lab };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { lab, user } = await requireLabRole(request, params.labId, MANAGERS);
  const parsed = parseForm(NewProtocolSchema, await readFormData(request));
  if (!parsed.ok) return data(parsed, { status: 400 });
  const { protocol } = await createProtocol(user, lab.id, parsed.data);
  return redirect(`/labs/${lab.id}/protocols/${protocol.id}/versions/1`);
}

export default function NewProtocol({ actionData }: Route.ComponentProps) {
  const errors: Record<string, string> = actionData && !actionData.ok ? actionData.errors : {};
  const values: Record<string, string> = actionData && !actionData.ok ? actionData.values : {};
  const chosen = values.template ?? "rope";
  return (
    <div className="max-w-2xl">
      <PageTitle lead="Start from a template or from defaults; everything can be changed in the draft before it is published.">New protocol</PageTitle>
      <Form method="post" className="flex flex-col gap-5" noValidate>
        <FormAlert message={actionData && !actionData.ok ? actionData.formError : undefined} />
        <Field label="Name" name="name" defaultValue={values.name} error={errors.name} />
        <fieldset className="flex flex-col gap-2" aria-describedby={errors.template ? "template-error" : undefined}>
          <legend className="mb-1 font-bold">Start from</legend>
          {TEMPLATE_IDS.map((t) => (
            <label key={t} className="flex min-h-target cursor-pointer items-start gap-3 rounded border border-rule bg-card p-3 has-[:checked]:border-2 has-[:checked]:border-ink">
              <input type="radio" name="template" value={t} defaultChecked={t === chosen} className="mt-1 h-5 w-5 accent-ink" />
              <span>
                <span className="block font-bold">{TEMPLATE_LABELS[t].title}</span>
                <span className="text-graphite-600">{TEMPLATE_LABELS[t].text}</span>
              </span>
            </label>
          ))}
          {errors.template ? (
            <p id="template-error" className="text-sm font-bold text-fault">
              {errors.template}
            </p>
          ) : null}
        </fieldset>
        <SubmitButton>Create the draft</SubmitButton>
      </Form>
    </div>
  );
}
