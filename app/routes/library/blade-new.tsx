import { data, redirect } from "react-router";
import type { Route } from "./+types/blade-new";
import { PageTitle } from "~/components/form.tsx";
import { BladeForm } from "~/components/blade-form.tsx";
import { LibraryNav } from "~/components/table.tsx";
import { MANAGERS, requireLabRole } from "~/server/access.server.ts";
import { createBlade, LibraryError } from "~/server/library.server.ts";
import { BladeInput } from "~/lib/library-input.ts";
import { parseForm } from "~/lib/forms.ts";
import { readFormData } from "~/server/form-data.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Add a blade · Blindcut" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, MANAGERS);
  return { lab };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { lab, user } = await requireLabRole(request, params.labId, MANAGERS);
  const form = await readFormData(request);
  const parsed = parseForm(BladeInput, form);
  if (!parsed.ok) return data(parsed, { status: 400 });
  const photo = form.get("photoFileId");
  try {
    const blade = await createBlade(lab.id, user.id, parsed.data, typeof photo === "string" && photo ? photo : undefined);
    return redirect(`/labs/${lab.id}/blades/${blade.id}`);
  } catch (error) {
    if (error instanceof LibraryError) {
      const values = Object.fromEntries([...form].filter(([, v]) => typeof v === "string")) as Record<string, string>;
      return data({ ok: false as const, values, errors: error.field ? { [error.field]: error.message } : {}, formError: error.field ? undefined : error.message }, { status: error.status });
    }
    throw error;
  }
}

export default function NewBlade({ loaderData, actionData }: Route.ComponentProps) {
  return (
    <div>
      <LibraryNav labId={loaderData.lab.id} />
      <PageTitle lead="Every field states its unit. Leave a measurement blank if it was not taken.">Add a blade</PageTitle>
      <BladeForm labId={loaderData.lab.id} values={actionData?.values ?? {}} errors={actionData?.errors ?? {}} formError={actionData?.formError} submitLabel="Add the blade" />
    </div>
  );
}
