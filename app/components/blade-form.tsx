import { Form } from "react-router";
import { Field, FormAlert, SelectField, SubmitButton } from "./form.tsx";
import { PhotoUpload } from "./photo-upload.tsx";
import { BLADE_STATUSES, BLADE_STATUS_LABELS } from "~/lib/library-input.ts";

export type BladeFormValues = Partial<Record<string, string>>;

/** The blade form, shared by "new" and "edit": units stated on every field. */
export function BladeForm({ labId, values, errors, formError, submitLabel }: { labId: string; values: BladeFormValues; errors: Record<string, string>; formError?: string; submitLabel: string }) {
  return (
    <Form method="post" className="grid max-w-3xl gap-5" noValidate>
      <FormAlert message={formError} />
      <fieldset className="grid gap-4 md:grid-cols-2">
        <legend className="mb-2 text-lg font-bold">Identity (never shown to testers)</legend>
        <Field label="Inventory number" name="inventoryNumber" defaultValue={values.inventoryNumber} error={errors.inventoryNumber} hint="The lab's own name for the blade; unique in the lab." />
        <Field label="Steel designation" name="steel" defaultValue={values.steel} error={errors.steel} hint="A standard designation, e.g. AISI 52100." />
        <Field label="Source" name="source" defaultValue={values.source} error={errors.source} />
        <SelectField label="Status" name="status" defaultValue={values.status ?? "in_lab"} error={errors.status} options={BLADE_STATUSES.map((s) => ({ value: s, label: BLADE_STATUS_LABELS[s] }))} />
      </fieldset>
      <fieldset className="grid gap-4 md:grid-cols-2">
        <legend className="mb-2 text-lg font-bold">Hardness and heat treatment</legend>
        <Field label="Hardness readings" unit="HRC" name="hardnessHrc" defaultValue={values.hardnessHrc} error={errors.hardnessHrc} hint="Each Rockwell C reading, separated by commas or spaces, e.g. 61.5, 62, 61.8." inputMode="decimal" />
        <Field label="Heat-treatment notes" name="heatTreatment" defaultValue={values.heatTreatment} error={errors.heatTreatment} />
      </fieldset>
      <fieldset className="grid gap-4 md:grid-cols-3">
        <legend className="mb-2 text-lg font-bold">Geometry</legend>
        <Field label="Blade length" unit="mm" name="bladeLengthMm" defaultValue={values.bladeLengthMm} error={errors.bladeLengthMm} inputMode="decimal" />
        <Field label="Edge length under test" unit="mm" name="edgeLengthMm" defaultValue={values.edgeLengthMm} error={errors.edgeLengthMm} hint="After taping off." inputMode="decimal" />
        <Field label="Edge angle per side" unit="degrees" name="edgeAngleDeg" defaultValue={values.edgeAngleDeg} error={errors.edgeAngleDeg} inputMode="decimal" />
        <Field label="Edge thickness behind the edge" unit="mm" name="edgeThicknessMm" defaultValue={values.edgeThicknessMm} error={errors.edgeThicknessMm} inputMode="decimal" />
        <Field label="Measured at, from the apex" unit="mm" name="edgeThicknessAtMm" defaultValue={values.edgeThicknessAtMm} error={errors.edgeThicknessAtMm} inputMode="decimal" />
        <Field label="Edge finish notes" name="edgeFinish" defaultValue={values.edgeFinish} error={errors.edgeFinish} />
      </fieldset>
      <PhotoUpload uploadUrl={`/labs/${labId}/uploads`} label="Photo of the blade" />
      <div>
        <SubmitButton>{submitLabel}</SubmitButton>
      </div>
    </Form>
  );
}

/** A stored blade as the form's string values. */
export function bladeToFormValues(b: {
  inventoryNumber: string; steel: string; hardnessHrc: number[]; heatTreatment: string; source: string; bladeLengthMm: number | null; edgeLengthMm: number | null;
  edgeThicknessMm: number | null; edgeThicknessAtMm: number | null; edgeAngleDeg: number | null; edgeFinish: string; status: string;
}): BladeFormValues {
  const n = (v: number | null) => (v === null ? "" : String(v));
  return {
    inventoryNumber: b.inventoryNumber, steel: b.steel, hardnessHrc: b.hardnessHrc.join(", "), heatTreatment: b.heatTreatment, source: b.source,
    bladeLengthMm: n(b.bladeLengthMm), edgeLengthMm: n(b.edgeLengthMm), edgeThicknessMm: n(b.edgeThicknessMm), edgeThicknessAtMm: n(b.edgeThicknessAtMm),
    edgeAngleDeg: n(b.edgeAngleDeg), edgeFinish: b.edgeFinish, status: b.status,
  };
}
