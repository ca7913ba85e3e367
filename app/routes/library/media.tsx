import { Form, Link, data } from "react-router";
import type { Route } from "./+types/media";
import { Field, FormAlert, PageTitle, SelectField, SubmitButton } from "~/components/form.tsx";
import { EmptyState, LibraryNav, Pagination, SortHeader, TableFilters } from "~/components/table.tsx";
import { MANAGERS, requireLabRole } from "~/server/access.server.ts";
import { createMedium, listMedia, MEDIA_SORTS } from "~/server/library.server.ts";
import { MediumInput } from "~/lib/library-input.ts";
import { parseForm } from "~/lib/forms.ts";
import { parseTableQuery } from "~/lib/table-query.ts";
import { readFormData } from "~/server/form-data.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Cut media · Library · Blindcut" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, MANAGERS);
  const query = parseTableQuery(new URL(request.url), MEDIA_SORTS, { sort: "name" }, ["kind"]);
  return { lab, query, ...(await listMedia(lab.id, query)) };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { lab, user } = await requireLabRole(request, params.labId, MANAGERS);
  const parsed = parseForm(MediumInput, await readFormData(request));
  if (!parsed.ok) return data({ ...parsed, done: null }, { status: 400 });
  const medium = await createMedium(lab.id, user.id, parsed.data);
  return { ok: true as const, errors: {}, values: {}, formError: undefined, done: `${medium.name} added. Open it to record its lots.` };
}

const KIND_LABELS = { rope: "Rope", card: "Card" } as const;

export default function Media({ loaderData, actionData }: Route.ComponentProps) {
  const { lab, query, rows, total } = loaderData;
  const errors: Record<string, string> = actionData?.errors ?? {};
  const values: Record<string, string> = actionData?.values ?? {};
  return (
    <div>
      <LibraryNav labId={lab.id} />
      <PageTitle lead="The media the lab cuts, with their lots. Testers choose a lot by its code at the bench.">Cut media</PageTitle>
      <div className="grid gap-8 md:grid-cols-[3fr_2fr]">
        <section>
          <TableFilters q={query.q} placeholder="Name or material…">
            <div className="flex flex-col gap-1">
              <label htmlFor="filter-kind" className="font-bold">Kind</label>
              <select id="filter-kind" name="kind" defaultValue={query.filters.kind ?? ""} className="min-h-target rounded border border-graphite-400 bg-card px-2">
                <option value="">Any</option>
                <option value="rope">Rope</option>
                <option value="card">Card</option>
              </select>
            </div>
          </TableFilters>
          {rows.length === 0 ? (
            <EmptyState title={query.q || query.filters.kind ? "No medium matches" : "No cut media yet"}>
              {query.q || query.filters.kind ? "Clear the search to see every medium." : "Add the rope or card the lab cuts with the form beside this list."}
            </EmptyState>
          ) : (
            <table className="w-full border-collapse text-left">
              <thead>
                <tr className="border-b-2 border-graphite-800">
                  <SortHeader column="name" label="Name" sort={query.sort} dir={query.dir} />
                  <SortHeader column="kind" label="Kind" sort={query.sort} dir={query.dir} />
                  <SortHeader column="material" label="Material" sort={query.sort} dir={query.dir} />
                  <th scope="col" className="py-2 pr-3">Size (mm)</th>
                  <th scope="col" className="py-2 pr-3">Lots</th>
                </tr>
              </thead>
              <tbody>
                {rows.map((m) => (
                  <tr key={m.id} className="border-b border-rule">
                    <td className="py-2 pr-3 font-bold"><Link to={`/labs/${lab.id}/media/${m.id}`}>{m.name}</Link></td>
                    <td className="py-2 pr-3">{KIND_LABELS[m.kind]}</td>
                    <td className="py-2 pr-3">{m.material}</td>
                    <td className="figures py-2 pr-3">{m.sizeMm}</td>
                    <td className="figures py-2 pr-3">{m.lots}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
          <Pagination page={query.page} pageSize={query.pageSize} total={total} />
        </section>
        <section>
          <h2 className="mb-3 text-xl font-bold">Add a medium</h2>
          <Form key={actionData?.done ?? "medium"} method="post" className="flex flex-col gap-3" noValidate>
            <FormAlert tone="ok" message={actionData?.done ?? undefined} />
            <Field label="Name" name="name" defaultValue={values.name} error={errors.name} />
            <SelectField label="Kind" name="kind" defaultValue={values.kind} error={errors.kind} options={[{ value: "rope", label: "Rope" }, { value: "card", label: "Card" }]} />
            <Field label="Material" name="material" defaultValue={values.material} error={errors.material} hint="e.g. manila, sisal, silica-loaded card" />
            <Field label="Diameter (rope) or thickness (card)" unit="mm" name="sizeMm" defaultValue={values.sizeMm} error={errors.sizeMm} inputMode="decimal" />
            <Field label="Notes" name="notes" defaultValue={values.notes} error={errors.notes} />
            <div><SubmitButton>Add the medium</SubmitButton></div>
          </Form>
        </section>
      </div>
    </div>
  );
}
