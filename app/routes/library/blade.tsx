import { Form, Link, data } from "react-router";
import type { Route } from "./+types/blade";
import { Field, FormAlert, PageTitle, SelectField, SubmitButton } from "~/components/form.tsx";
import { LibraryNav } from "~/components/table.tsx";
import { PhotoUpload } from "~/components/photo-upload.tsx";
import { MANAGERS, notFound, requireLabRole, isUuid } from "~/server/access.server.ts";
import { addCustodyEvent, custodyLog, getBlade, LibraryError } from "~/server/library.server.ts";
import { BLADE_STATUS_LABELS, CUSTODY_KINDS, CUSTODY_LABELS, CustodyInput } from "~/lib/library-input.ts";
import { parseForm } from "~/lib/forms.ts";
import { hrcToHv, hvConversionSource, summarizeHardness, HRC_TABLE_MAX, HRC_TABLE_MIN } from "~/domain/hardness.ts";
import { readFormData } from "~/server/form-data.server.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.blade.inventoryNumber ?? "Blade"} · Blindcut` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, MANAGERS);
  const blade = isUuid(params.bladeId) ? await getBlade(lab.id, params.bladeId) : null;
  if (!blade) notFound();
  const custody = await custodyLog(lab.id, blade.id);
  const hardness = blade.hardnessHrc.length ? summarizeHardness(blade.hardnessHrc) : null;
  const inTable = hardness && hardness.mean >= HRC_TABLE_MIN && hardness.mean <= HRC_TABLE_MAX;
  const hv = inTable ? Math.round(hrcToHv(hardness.mean)) : null;
  const hvSource = inTable ? hvConversionSource(hardness.mean) : null;
  return { lab, blade, custody, hardness, hv, hvSource, today: new Date().toISOString().slice(0, 10) };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { lab, user } = await requireLabRole(request, params.labId, MANAGERS);
  // Another lab's id is 404 before the input is even read.
  if (!isUuid(params.bladeId) || !(await getBlade(lab.id, params.bladeId))) notFound();
  const parsed = parseForm(CustodyInput, await readFormData(request));
  if (!parsed.ok) return data({ ...parsed, done: null }, { status: 400 });
  try {
    await addCustodyEvent(lab.id, user.id, params.bladeId, parsed.data);
    return { ok: true as const, errors: {}, values: {}, formError: undefined, done: "Custody recorded." };
  } catch (error) {
    if (error instanceof LibraryError) {
      if (error.status === 404) notFound();
      return data({ ok: false as const, errors: error.field ? { [error.field]: error.message } : {}, values: parsed.data as unknown as Record<string, string>, formError: error.message, done: null }, { status: error.status });
    }
    throw error;
  }
}

const fmt = (v: number | null, digits = 1) => (v === null ? "—" : v.toFixed(digits));

export default function BladePage({ loaderData, actionData }: Route.ComponentProps) {
  const { lab, blade, custody, hardness, hv, hvSource } = loaderData;
  const holder = custody[0];
  const errors: Record<string, string> = actionData?.errors ?? {};
  return (
    <div>
      <LibraryNav labId={lab.id} />
      <div className="flex flex-wrap items-start justify-between gap-4">
        <PageTitle lead={`${blade.steel} · ${BLADE_STATUS_LABELS[blade.status]}${holder ? ` · held by ${holder.holder} since ${holder.on}` : ""}`}>
          Blade {blade.inventoryNumber}
        </PageTitle>
        <Link to={`/labs/${lab.id}/blades/${blade.id}/edit`} className="inline-flex min-h-target items-center rounded border border-graphite-800 px-4 font-bold text-graphite-950 no-underline">
          Edit
        </Link>
      </div>
      <div className="grid gap-8 md:grid-cols-[3fr_2fr]">
        <section aria-labelledby="measures">
          <h2 id="measures" className="mb-3 text-xl font-bold">Measurements</h2>
          <dl className="grid grid-cols-[auto_1fr] gap-x-6 gap-y-2">
            <dt className="font-bold">Hardness</dt>
            <dd className="figures">
              {hardness ? (
                <>
                  mean {hardness.mean.toFixed(1)} HRC
                  {hv !== null ? (
                    <span className="text-graphite-600" data-testid="hv-conversion">
                      {" "}(≈ {hv} HV, approximate, ASTM E140 table 1{hvSource === "from memory" ? "; row from memory: check against the standard" : "; rows as in the project's references"})
                    </span>
                  ) : null}
                  <br />
                  <span className="text-graphite-600">
                    {hardness.n} reading{hardness.n === 1 ? "" : "s"}: {blade.hardnessHrc.join(", ")} · SD {fmt(hardness.sd, 2)} · range {hardness.range.toFixed(1)}
                  </span>
                </>
              ) : (
                "not measured"
              )}
            </dd>
            <dt className="font-bold">Heat treatment</dt>
            <dd>{blade.heatTreatment || "—"}</dd>
            <dt className="font-bold">Source</dt>
            <dd>{blade.source || "—"}</dd>
            <dt className="font-bold">Blade length</dt>
            <dd className="figures">{fmt(blade.bladeLengthMm)} mm</dd>
            <dt className="font-bold">Edge length under test</dt>
            <dd className="figures">{fmt(blade.edgeLengthMm)} mm</dd>
            <dt className="font-bold">Edge thickness</dt>
            <dd className="figures">
              {blade.edgeThicknessMm === null ? "—" : `${blade.edgeThicknessMm} mm at ${blade.edgeThicknessAtMm} mm from the apex`}
            </dd>
            <dt className="font-bold">Edge angle</dt>
            <dd className="figures">
              {blade.edgeAngleDeg === null ? "—" : `${blade.edgeAngleDeg}° per side (${(blade.edgeAngleDeg * 2).toFixed(1).replace(/\.0$/, "")}° included)`}
            </dd>
            <dt className="font-bold">Edge finish</dt>
            <dd>{blade.edgeFinish || "—"}</dd>
          </dl>
          {blade.photoFileId ? (
            <img src={`/labs/${lab.id}/files/${blade.photoFileId}`} alt={`Photo of blade ${blade.inventoryNumber}`} className="mt-6 max-h-80 rounded border border-rule" />
          ) : null}
        </section>
        <section aria-labelledby="custody">
          <h2 id="custody" className="mb-3 text-xl font-bold">Custody</h2>
          {custody.length === 0 ? <p className="text-graphite-600">No custody events yet. Record when the blade was received.</p> : null}
          <ol className="mb-6 flex flex-col gap-2">
            {custody.map((c) => (
              <li key={c.id} className="rounded border border-rule bg-card p-3">
                <p className="font-bold">
                  {CUSTODY_LABELS[c.kind]} · <span className="figures">{c.on}</span>
                </p>
                <p>Holder: {c.holder}</p>
                {c.condition ? <p className="text-graphite-600">{c.condition}</p> : null}
                {c.photoFileId ? <img src={`/labs/${lab.id}/files/${c.photoFileId}`} alt={`Condition photo, ${c.on}`} className="mt-2 max-h-40 rounded" /> : null}
              </li>
            ))}
          </ol>
          <Form key={actionData?.done ?? "custody"} method="post" className="flex flex-col gap-3" noValidate>
            <h3 className="font-bold">Record custody</h3>
            <FormAlert message={actionData?.formError} />
            <FormAlert tone="ok" message={actionData?.done ?? undefined} />
            <SelectField label="What happened" name="kind" error={errors.kind} options={CUSTODY_KINDS.map((k) => ({ value: k, label: CUSTODY_LABELS[k] }))} />
            <Field label="Date" name="on" type="date" defaultValue={loaderData.today} error={errors.on} />
            <Field label="Held by" name="holder" error={errors.holder} hint="A person or a place." />
            <Field label="Condition notes" name="condition" error={errors.condition} />
            <PhotoUpload uploadUrl={`/labs/${lab.id}/uploads`} label="Condition photo (optional)" />
            <div>
              <SubmitButton>Record</SubmitButton>
            </div>
          </Form>
        </section>
      </div>
    </div>
  );
}
