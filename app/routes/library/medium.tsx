import { Form, data } from "react-router";
import type { Route } from "./+types/medium";
import { Field, FormAlert, PageTitle, SubmitButton } from "~/components/form.tsx";
import { EmptyState, LibraryNav } from "~/components/table.tsx";
import { MANAGERS, notFound, requireLabRole, isUuid } from "~/server/access.server.ts";
import { createLot, getMedium, LibraryError, setLotAcceptance } from "~/server/library.server.ts";
import { LotAcceptanceInput, LotInput } from "~/lib/library-input.ts";
import { parseForm } from "~/lib/forms.ts";
import { readFormData } from "~/server/form-data.server.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.medium.name ?? "Medium"} · Blindcut` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, MANAGERS);
  const medium = isUuid(params.mediumId) ? await getMedium(lab.id, params.mediumId) : null;
  if (!medium) notFound();
  return { lab, medium, today: new Date().toISOString().slice(0, 10) };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { lab, user } = await requireLabRole(request, params.labId, MANAGERS);
  if (!isUuid(params.mediumId) || !(await getMedium(lab.id, params.mediumId))) notFound();
  const form = await readFormData(request);
  if (form.get("intent") === "acceptance") {
    const acceptance = parseForm(LotAcceptanceInput, form);
    if (!acceptance.ok) return data({ ...acceptance, formError: Object.values(acceptance.errors)[0], done: null }, { status: 400 });
    try {
      const lot = await setLotAcceptance(lab.id, user.id, params.mediumId, acceptance.data);
      const n = lot.requiredReferenceRuns;
      return { ok: true as const, errors: {}, values: {}, formError: undefined, done: n ? `Lot ${lot.lotCode} now needs ${n} ended reference run(s) before study runs use it.` : `Lot ${lot.lotCode} needs no reference runs.` };
    } catch (error) {
      if (error instanceof LibraryError && error.status === 404) notFound();
      throw error;
    }
  }
  const parsed = parseForm(LotInput, form);
  if (!parsed.ok) return data({ ...parsed, done: null }, { status: 400 });
  try {
    await createLot(lab.id, user.id, params.mediumId, parsed.data);
    return { ok: true as const, errors: {}, values: {}, formError: undefined, done: `Lot ${parsed.data.lotCode} recorded.` };
  } catch (error) {
    if (error instanceof LibraryError) {
      if (error.status === 404) notFound();
      return data({ ok: false as const, errors: error.field ? { [error.field]: error.message } : {}, values: parsed.data as unknown as Record<string, string>, formError: undefined, done: null }, { status: error.status });
    }
    throw error;
  }
}

export default function MediumPage({ loaderData, actionData }: Route.ComponentProps) {
  const { lab, medium } = loaderData;
  const errors: Record<string, string> = actionData?.errors ?? {};
  const values: Record<string, string> = actionData?.values ?? {};
  return (
    <div>
      <LibraryNav labId={lab.id} />
      <PageTitle lead={`${medium.kind === "rope" ? "Rope" : "Card"} · ${medium.material} · ${medium.sizeMm} mm${medium.notes ? ` · ${medium.notes}` : ""}`}>{medium.name}</PageTitle>
      <div className="grid gap-8 md:grid-cols-[3fr_2fr]">
        <section>
          <h2 className="mb-3 text-xl font-bold">Lots</h2>
          <FormAlert message={actionData?.formError ?? undefined} />
          {medium.lots.length === 0 ? (
            <EmptyState title="No lots yet">Record the first lot received with the form beside this list.</EmptyState>
          ) : (
            <table className="w-full border-collapse text-left">
              <thead>
                <tr className="border-b-2 border-graphite-800">
                  <th scope="col" className="py-2">Lot code</th>
                  <th scope="col" className="py-2">Received</th>
                  <th scope="col" className="py-2">Conditioning</th>
                  <th scope="col" className="py-2">Acceptance (reference runs)</th>
                </tr>
              </thead>
              <tbody>
                {medium.lots.map((l) => (
                  <tr key={l.id} className="border-b border-rule">
                    <td className="figures py-2 font-bold">{l.lotCode}</td>
                    <td className="figures py-2">{l.receivedOn}</td>
                    <td className="py-2">{l.conditioning || "—"}</td>
                    <td className="py-2">
                      <p className="figures" data-testid="lot-acceptance">
                        {l.requiredReferenceRuns
                          ? `${l.referenceRunsEnded} ended, ${l.requiredReferenceRuns} required: ${l.referenceRunsEnded >= l.requiredReferenceRuns ? "accepted for study runs" : "refused for study runs until then"}`
                          : "none required"}
                      </p>
                      <Form method="post" className="mt-1 flex items-end gap-2">
                        <input type="hidden" name="intent" value="acceptance" />
                        <input type="hidden" name="lotId" value={l.id} />
                        <label className="flex flex-col text-sm">
                          Required
                          <input name="requiredReferenceRuns" inputMode="numeric" defaultValue={l.requiredReferenceRuns ?? ""} aria-label={`Reference runs lot ${l.lotCode} needs`} className="w-20 rounded border border-graphite-400 px-2" />
                        </label>
                        <button type="submit" className="rounded border border-graphite-800 px-2 text-sm">Set</button>
                      </Form>
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
        </section>
        <section>
          <h2 className="mb-3 text-xl font-bold">Record a lot</h2>
          <Form key={actionData?.done ?? "lot"} method="post" className="flex flex-col gap-3" noValidate>
            <FormAlert tone="ok" message={actionData?.done ?? undefined} />
            <Field label="Lot code" name="lotCode" defaultValue={values.lotCode} error={errors.lotCode} />
            <Field label="Received on" name="receivedOn" type="date" defaultValue={values.receivedOn ?? loaderData.today} error={errors.receivedOn} />
            <Field label="Conditioning" name="conditioning" defaultValue={values.conditioning} error={errors.conditioning} hint="e.g. 48 h at 50 % relative humidity" />
            <Field label="Required reference runs" name="requiredReferenceRuns" inputMode="numeric" defaultValue={values.requiredReferenceRuns} error={errors.requiredReferenceRuns} hint="The bench refuses the lot for study runs until this many reference runs on it have ended; blank for none" />
            <div><SubmitButton>Record the lot</SubmitButton></div>
          </Form>
        </section>
      </div>
    </div>
  );
}
