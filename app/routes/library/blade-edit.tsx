import { data, redirect } from "react-router";
import type { Route } from "./+types/blade-edit";
import { PageTitle } from "~/components/form.tsx";
import { BladeForm, bladeToFormValues } from "~/components/blade-form.tsx";
import { LibraryNav } from "~/components/table.tsx";
import { MANAGERS, notFound, requireLabRole, isUuid } from "~/server/access.server.ts";
import { getBlade, LibraryError, updateBlade } from "~/server/library.server.ts";
import { BladeInput } from "~/lib/library-input.ts";
import { parseForm } from "~/lib/forms.ts";
import { readFormData } from "~/server/form-data.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Edit blade · Blindcut" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, MANAGERS);
  const blade = isUuid(params.bladeId) ? await getBlade(lab.id, params.bladeId) : null;
  if (!blade) notFound();
  return { lab, bladeId: blade.id, values: bladeToFormValues(blade) };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { lab, user } = await requireLabRole(request, params.labId, MANAGERS);
  if (!isUuid(params.bladeId) || !(await getBlade(lab.id, params.bladeId))) notFound();
  const form = await readFormData(request);
  const parsed = parseForm(BladeInput, form);
  if (!parsed.ok) return data(parsed, { status: 400 });
  const photo = form.get("photoFileId");
  try {
    await updateBlade(lab.id, user.id, params.bladeId, parsed.data, typeof photo === "string" && photo ? photo : undefined);
    return redirect(`/labs/${lab.id}/blades/${params.bladeId}`);
  } catch (error) {
    if (error instanceof LibraryError) {
      if (error.status === 404) notFound();
      const values = Object.fromEntries([...form].filter(([, v]) => typeof v === "string")) as Record<string, string>;
      return data({ ok: false as const, values, errors: error.field ? { [error.field]: error.message } : {}, formError: error.field ? undefined : error.message }, { status: error.status });
    }
    throw error;
  }
}

export default function EditBlade({ loaderData, actionData }: Route.ComponentProps) {
  return (
    <div>
      <LibraryNav labId={loaderData.lab.id} />
      <PageTitle>Edit blade {loaderData.values.inventoryNumber}</PageTitle>
      <BladeForm labId={loaderData.lab.id} values={actionData?.values ?? loaderData.values} errors={actionData?.errors ?? {}} formError={actionData?.formError} submitLabel="Save the blade" />
    </div>
  );
}
