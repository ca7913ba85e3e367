import { Form, Link, data } from "react-router";
import type { Route } from "./+types/instruments";
import { Field, FormAlert, PageTitle, SelectField, SubmitButton } from "~/components/form.tsx";
import { EmptyState, LibraryNav, Pagination, SortHeader, TableFilters } from "~/components/table.tsx";
import { CalibrationBadge } from "~/components/calibration-badge.tsx";
import { MANAGERS, requireLabRole } from "~/server/access.server.ts";
import { createInstrument, INSTRUMENT_SORTS, LibraryError, listInstruments } from "~/server/library.server.ts";
import { INSTRUMENT_KIND_LABELS, InstrumentInput } from "~/lib/library-input.ts";
import { parseForm } from "~/lib/forms.ts";
import { parseTableQuery } from "~/lib/table-query.ts";
import { readFormData } from "~/server/form-data.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Instruments · Library · Blindcut" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, MANAGERS);
  const query = parseTableQuery(new URL(request.url), INSTRUMENT_SORTS, { sort: "name" }, ["kind"]);
  return { lab, query, ...(await listInstruments(lab.id, query)) };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { lab, user } = await requireLabRole(request, params.labId, MANAGERS);
  const parsed = parseForm(InstrumentInput, await readFormData(request));
  if (!parsed.ok) return data({ ...parsed, done: null }, { status: 400 });
  try {
    const instrument = await createInstrument(lab.id, user.id, parsed.data);
    return { ok: true as const, errors: {}, values: {}, formError: undefined, done: `${instrument.name} added. Record its first calibration check.` };
  } catch (error) {
    if (error instanceof LibraryError) {
      return data({ ok: false as const, errors: error.field ? { [error.field]: error.message } : {}, values: parsed.data as unknown as Record<string, string>, formError: undefined, done: null }, { status: error.status });
    }
    throw error;
  }
}

export default function Instruments({ loaderData, actionData }: Route.ComponentProps) {
  const { lab, query, rows, total } = loaderData;
  const errors: Record<string, string> = actionData?.errors ?? {};
  const values: Record<string, string> = actionData?.values ?? {};
  return (
    <div>
      <LibraryNav labId={lab.id} />
      <PageTitle lead="A run on an instrument whose last check failed, or is past its interval, is flagged wherever the instrument can be chosen.">Instruments</PageTitle>
      <div className="grid gap-8 md:grid-cols-[3fr_2fr]">
        <section>
          <TableFilters q={query.q} placeholder="Name or test medium…">
            <div className="flex flex-col gap-1">
              <label htmlFor="filter-kind" className="font-bold">Kind</label>
              <select id="filter-kind" name="kind" defaultValue={query.filters.kind ?? ""} className="min-h-target rounded border border-graphite-400 bg-card px-2">
                <option value="">Any</option>
                <option value="sharpness_tester">Sharpness tester</option>
                <option value="card_machine">Card-test machine</option>
              </select>
            </div>
          </TableFilters>
          {rows.length === 0 ? (
            <EmptyState title={query.q || query.filters.kind ? "No instrument matches" : "No instruments yet"}>
              {query.q || query.filters.kind ? "Clear the search to see every instrument." : "Add the lab's sharpness tester or card machine with the form beside this list."}
            </EmptyState>
          ) : (
            <table className="w-full border-collapse text-left" data-testid="instruments-table">
              <thead>
                <tr className="border-b-2 border-graphite-800">
                  <SortHeader column="name" label="Name" sort={query.sort} dir={query.dir} />
                  <SortHeader column="kind" label="Kind" sort={query.sort} dir={query.dir} />
                  <th scope="col" className="py-2 pr-3">Resolution</th>
                  <th scope="col" className="py-2 pr-3">Calibration</th>
                </tr>
              </thead>
              <tbody>
                {rows.map((i) => (
                  <tr key={i.id} className="border-b border-rule">
                    <td className="py-2 pr-3 font-bold"><Link to={`/labs/${lab.id}/instruments/${i.id}`}>{i.name}</Link></td>
                    <td className="py-2 pr-3">{INSTRUMENT_KIND_LABELS[i.kind]}</td>
                    <td className="figures py-2 pr-3">{i.resolution} {i.kind === "sharpness_tester" ? "gf" : "mm"}</td>
                    <td className="py-2 pr-3"><CalibrationBadge status={i.calibration} /></td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
          <Pagination page={query.page} pageSize={query.pageSize} total={total} />
        </section>
        <section>
          <h2 className="mb-3 text-xl font-bold">Add an instrument</h2>
          <Form key={actionData?.done ?? "instrument"} method="post" className="flex flex-col gap-3" noValidate>
            <FormAlert tone="ok" message={actionData?.done ?? undefined} />
            <Field label="Name" name="name" defaultValue={values.name} error={errors.name} hint="The lab's own name for it, e.g. Bench tester 2." />
            <SelectField label="Kind" name="kind" defaultValue={values.kind} error={errors.kind} options={[{ value: "sharpness_tester", label: "Sharpness tester" }, { value: "card_machine", label: "Card-test machine" }]} />
            <Field label="Test medium" name="testMedium" defaultValue={values.testMedium} error={errors.testMedium} />
            <Field label="Resolution" unit="gf or mm" name="resolution" defaultValue={values.resolution} error={errors.resolution} inputMode="decimal" />
            <Field label="Maximum reading" unit="gf or mm" name="maxReading" defaultValue={values.maxReading} error={errors.maxReading} inputMode="decimal" />
            <Field label="Calibration interval" unit="days" name="calibrationIntervalDays" defaultValue={values.calibrationIntervalDays ?? "30"} error={errors.calibrationIntervalDays} inputMode="numeric" />
            <div><SubmitButton>Add the instrument</SubmitButton></div>
          </Form>
        </section>
      </div>
    </div>
  );
}
