import { Form, data } from "react-router";
import type { Route } from "./+types/instrument";
import { precisionForInstrument } from "~/server/quality.server.ts";
import { PrecisionResults } from "~/components/quality/precision-result.tsx";
import { Field, FormAlert, PageTitle, SubmitButton } from "~/components/form.tsx";
import { EmptyState, LibraryNav } from "~/components/table.tsx";
import { CalibrationBadge } from "~/components/calibration-badge.tsx";
import { MANAGERS, notFound, requireLabRole, isUuid } from "~/server/access.server.ts";
import { addCalibrationCheck, getInstrument, LibraryError } from "~/server/library.server.ts";
import { CalibrationInput } from "~/lib/library-input.ts";
import { parseForm } from "~/lib/forms.ts";
import { readFormData } from "~/server/form-data.server.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.instrument.name ?? "Instrument"} · Blindcut` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, MANAGERS);
  const instrument = isUuid(params.instrumentId) ? await getInstrument(lab.id, params.instrumentId) : null;
  if (!instrument) notFound();
  return { lab, instrument, today: new Date().toISOString().slice(0, 10), precision: await precisionForInstrument(lab.id, instrument.id) };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { lab, user } = await requireLabRole(request, params.labId, MANAGERS);
  if (!isUuid(params.instrumentId) || !(await getInstrument(lab.id, params.instrumentId))) notFound();
  const parsed = parseForm(CalibrationInput, await readFormData(request));
  if (!parsed.ok) return data({ ...parsed, done: null }, { status: 400 });
  try {
    const check = await addCalibrationCheck(lab.id, user.id, params.instrumentId, parsed.data);
    return { ok: true as const, errors: {}, values: {}, formError: undefined, done: check.passed ? "Check recorded: passed." : "Check recorded: FAILED. The instrument is flagged until a check passes." };
  } catch (error) {
    if (error instanceof LibraryError && error.status === 404) notFound();
    throw error;
  }
}

export default function InstrumentPage({ loaderData, actionData }: Route.ComponentProps) {
  const { lab, instrument } = loaderData;
  const unit = instrument.kind === "sharpness_tester" ? "gf" : "mm";
  const errors: Record<string, string> = actionData?.errors ?? {};
  const values: Record<string, string> = actionData?.values ?? {};
  return (
    <div>
      <LibraryNav labId={lab.id} />
      <PageTitle lead={`${instrument.testMedium} · resolution ${instrument.resolution} ${unit} · calibration every ${instrument.calibrationIntervalDays} days`}>{instrument.name}</PageTitle>
      <p className="mb-6"><CalibrationBadge status={instrument.calibration} /></p>
      <div className="grid gap-8 md:grid-cols-[3fr_2fr]">
        <section>
          <h2 className="mb-3 text-xl font-bold">Calibration checks</h2>
          {instrument.checks.length === 0 ? (
            <EmptyState title="Never checked">Record a check against the reference before the instrument is used for a study.</EmptyState>
          ) : (
            <table className="w-full border-collapse text-left">
              <thead>
                <tr className="border-b-2 border-graphite-800">
                  <th scope="col" className="py-2">Date</th>
                  <th scope="col" className="py-2">Reference ({unit})</th>
                  <th scope="col" className="py-2">Reading ({unit})</th>
                  <th scope="col" className="py-2">Tolerance (± {unit})</th>
                  <th scope="col" className="py-2">Result</th>
                </tr>
              </thead>
              <tbody>
                {instrument.checks.map((c) => (
                  <tr key={c.id} className="border-b border-rule">
                    <td className="figures py-2">{c.on}</td>
                    <td className="figures py-2">{c.referenceValue}</td>
                    <td className="figures py-2">{c.reading}</td>
                    <td className="figures py-2">{c.tolerance}</td>
                    <td className={`py-2 font-bold ${c.passed ? "text-ok" : "text-signal"}`}>{c.passed ? "● Pass" : "▲ Fail"}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
        </section>
        <section>
          <h2 className="mb-3 text-xl font-bold">Record a check</h2>
          <Form key={actionData?.done ?? "check"} method="post" className="flex flex-col gap-3" noValidate>
            <FormAlert tone="ok" message={actionData?.done ?? undefined} />
            <Field label="Date" name="on" type="date" defaultValue={values.on ?? loaderData.today} error={errors.on} />
            <Field label="Reference value" unit={unit} name="referenceValue" defaultValue={values.referenceValue} error={errors.referenceValue} inputMode="decimal" />
            <Field label="Reading" unit={unit} name="reading" defaultValue={values.reading} error={errors.reading} inputMode="decimal" />
            <Field label="Tolerance" unit={`± ${unit}`} name="tolerance" defaultValue={values.tolerance} error={errors.tolerance} inputMode="decimal" />
            <Field label="Notes" name="notes" defaultValue={values.notes} error={errors.notes} />
            <div><SubmitButton>Record the check</SubmitButton></div>
          </Form>
        </section>
      </div>
      <PrecisionResults studies={loaderData.precision} />
      {loaderData.precision.length ? (
        <p className="mt-3">
          <a href={`/labs/${lab.id}/instruments/${instrument.id}/repeatability-readings.csv`} download data-testid="precision-csv">
            Download the repeatability readings (CSV, gf)
          </a>
        </p>
      ) : null}
    </div>
  );
}
