// The protocol editor: the whole content lives in state and goes to the server as one
// JSON field, parsed there by the protocol schema. Field messages come back keyed by
// the field's path and are shown beside the field; what was typed stays.
import { Form } from "react-router";
import { useId, useState } from "react";
import { SortableList, moveItem, type Keyed } from "./sortable-list.tsx";
import { FormAlert, SubmitButton } from "./form.tsx";
import {
  defaultCardSettings,
  defaultEdgeForceSettings,
  MEASUREMENT_KIND_LABELS,
  type CardSettings,
  type EdgeForceSettings,
  type FormShape,
  type MeasurementKind,
  type ProtocolContent,
  type SharpeningStep,
} from "~/domain/protocol.ts";

type StepForm = FormShape<SharpeningStep>;
type EditorState = {
  name: string;
  purpose: string;
  measurementKind: MeasurementKind;
  medium: { mediumId: string; description: string };
  cutMethod: {
    motion: "push" | "slice";
    strokeLengthMm: string;
    loading: "by_hand_fixture" | "set_load";
    cutLoadN: string;
    machine: boolean;
    strokeSpeedMmS: string;
  };
  edgeLengthMm: string;
  replicatesPerBlade: string;
  edgeForce: Omit<Record<keyof EdgeForceSettings, string>, "positions" | "aggregation" | "confirmAtFreshSpot"> & {
    positions: Keyed<string>[];
    aggregation: "mean" | "median";
    confirmAtFreshSpot: boolean;
  };
  card: Omit<Record<keyof CardSettings, string>, "valuesSource"> & { valuesSource: CardSettings["valuesSource"] };
  sharpening: Keyed<Record<keyof StepForm, string>>[];
  safetyChecklist: Keyed<string>[];
};

let keyCounter = 0;
const newKey = () => `k${++keyCounter}`;
const keyed = <T,>(value: T): Keyed<T> => ({ key: newKey(), value });
const str = (v: number | null | undefined) => (v === null || v === undefined ? "" : String(v));

function toState(c: ProtocolContent): EditorState {
  const f = c.edgeForce ?? defaultEdgeForceSettings();
  const k = c.card ?? defaultCardSettings();
  return {
    name: c.name,
    purpose: c.purpose,
    measurementKind: c.measurementKind,
    medium: { mediumId: c.medium.mediumId ?? "", description: c.medium.description },
    cutMethod: {
      motion: c.cutMethod.motion,
      strokeLengthMm: str(c.cutMethod.strokeLengthMm),
      loading: c.cutMethod.loading,
      cutLoadN: str(c.cutMethod.cutLoadN),
      machine: c.cutMethod.machine,
      strokeSpeedMmS: str(c.cutMethod.strokeSpeedMmS),
    },
    edgeLengthMm: str(c.edgeLengthMm),
    replicatesPerBlade: str(c.replicatesPerBlade),
    edgeForce: {
      checkEveryCuts: str(f.checkEveryCuts),
      positions: f.positions.map(keyed),
      aggregation: f.aggregation,
      thresholdGf: str(f.thresholdGf),
      confirmAtFreshSpot: f.confirmAtFreshSpot,
      testerMaxGf: str(f.testerMaxGf),
      capCuts: str(f.capCuts),
      workingHorizonCuts: str(f.workingHorizonCuts),
    },
    card: {
      strokeCount: str(k.strokeCount),
      initialStrokes: str(k.initialStrokes),
      initialPassMm: str(k.initialPassMm),
      totalPassMm: str(k.totalPassMm),
      valuesSource: k.valuesSource,
    },
    sharpening: c.sharpening.map((s) =>
      keyed({ abrasive: s.abrasive, grit: s.grit, angleDegPerSide: str(s.angleDegPerSide), amountKind: s.amountKind, amount: str(s.amount), deburring: s.deburring }),
    ),
    safetyChecklist: c.safetyChecklist.map(keyed),
  };
}

/** What the form sends: only the section of the chosen measurement kind, as typed. */
export function toContentInput(s: EditorState) {
  const edge = s.measurementKind === "edge_force";
  return {
    name: s.name,
    purpose: s.purpose,
    measurementKind: s.measurementKind,
    medium: { mediumId: s.medium.mediumId || null, description: s.medium.description },
    cutMethod: {
      ...s.cutMethod,
      cutLoadN: s.cutMethod.loading === "set_load" ? s.cutMethod.cutLoadN : null,
      strokeSpeedMmS: s.cutMethod.machine ? s.cutMethod.strokeSpeedMmS : null,
    },
    edgeLengthMm: s.edgeLengthMm,
    replicatesPerBlade: s.replicatesPerBlade,
    // An empty horizon is left out: the server declares the cap, the default.
    edgeForce: edge
      ? { ...s.edgeForce, workingHorizonCuts: s.edgeForce.workingHorizonCuts.trim() === "" ? undefined : s.edgeForce.workingHorizonCuts, positions: s.edgeForce.positions.map((p) => p.value) }
      : null,
    card: edge ? null : s.card,
    sharpening: s.sharpening.map((x) => x.value),
    safetyChecklist: s.safetyChecklist.map((x) => x.value),
  };
}

export type MediumChoice = { id: string; name: string; kind: "rope" | "card" };

export function ProtocolEditor({
  content,
  media,
  testerHints,
  errors,
  formError,
  saved,
}: {
  content: ProtocolContent;
  media: MediumChoice[];
  testerHints: string[];
  errors: Record<string, string>;
  formError?: string;
  saved?: string;
}) {
  const [s, setS] = useState<EditorState>(() => toState(content));
  const update = (fn: (d: EditorState) => EditorState) => setS((prev) => fn(prev));
  const errorCount = Object.keys(errors).length;
  const edge = s.measurementKind === "edge_force";
  const mediumKind = edge ? "rope" : "card";
  // Messages of whole sections, or of paths without a field of their own, are listed at the top.
  const shown = new Set<string>();
  const e = (path: string) => {
    shown.add(path);
    return errors[path];
  };

  const fieldsBody = (
    <>
      <Section title="About the protocol">
        <Text label="Name" value={s.name} error={e("name")} onChange={(v) => update((d) => ({ ...d, name: v }))} />
        <TextArea
          label="Purpose"
          hint="What the protocol is for; a tester can read this."
          value={s.purpose}
          error={e("purpose")}
          onChange={(v) => update((d) => ({ ...d, purpose: v }))}
        />
        <Choice
          label="Measurement kind"
          value={s.measurementKind}
          error={e("measurementKind")}
          options={(Object.keys(MEASUREMENT_KIND_LABELS) as MeasurementKind[]).map((k) => ({ value: k, label: MEASUREMENT_KIND_LABELS[k] }))}
          onChange={(v) =>
            update((d) => ({
              ...d,
              measurementKind: v as MeasurementKind,
              cutMethod: v === "card_depth" ? { ...d.cutMethod, machine: true, strokeSpeedMmS: d.cutMethod.strokeSpeedMmS || "50" } : d.cutMethod,
            }))
          }
        />
      </Section>

      <Section title="Cut medium">
        <Choice
          label="Lab medium"
          value={s.medium.mediumId}
          error={e("medium.mediumId")}
          hint={media.some((m) => m.kind === mediumKind) ? undefined : `The lab has no ${mediumKind} medium in its library yet: describe it below, and link it later.`}
          options={[
            { value: "", label: "None linked yet" },
            ...media.filter((m) => m.kind === mediumKind || m.id === s.medium.mediumId).map((m) => ({ value: m.id, label: m.name })),
          ]}
          onChange={(v) => update((d) => ({ ...d, medium: { ...d.medium, mediumId: v } }))}
        />
        <Text
          label="Description of the medium"
          value={s.medium.description}
          error={e("medium.description")}
          onChange={(v) => update((d) => ({ ...d, medium: { ...d.medium, description: v } }))}
        />
      </Section>

      <Section title="Cut method">
        <div className="grid gap-4 md:grid-cols-2">
          <Choice
            label="Motion"
            value={s.cutMethod.motion}
            error={e("cutMethod.motion")}
            options={[
              { value: "push", label: "Push cut" },
              { value: "slice", label: "Slice" },
            ]}
            onChange={(v) => update((d) => ({ ...d, cutMethod: { ...d.cutMethod, motion: v as "push" | "slice" } }))}
          />
          <Text
            label="Stroke length"
            unit="mm"
            numeric
            value={s.cutMethod.strokeLengthMm}
            error={e("cutMethod.strokeLengthMm")}
            onChange={(v) => update((d) => ({ ...d, cutMethod: { ...d.cutMethod, strokeLengthMm: v } }))}
          />
          <Choice
            label="Cut load"
            value={s.cutMethod.loading}
            error={e("cutMethod.loading")}
            options={[
              { value: "by_hand_fixture", label: "By hand in a fixture" },
              { value: "set_load", label: "A set load" },
            ]}
            onChange={(v) => update((d) => ({ ...d, cutMethod: { ...d.cutMethod, loading: v as "by_hand_fixture" | "set_load" } }))}
          />
          {s.cutMethod.loading === "set_load" ? (
            <Text
              label="Load"
              unit="N"
              numeric
              value={s.cutMethod.cutLoadN}
              error={e("cutMethod.cutLoadN")}
              onChange={(v) => update((d) => ({ ...d, cutMethod: { ...d.cutMethod, cutLoadN: v } }))}
            />
          ) : (
            <Hidden error={e("cutMethod.cutLoadN")} />
          )}
          <Check
            label="The cut is made by a machine"
            checked={s.cutMethod.machine}
            error={e("cutMethod.machine")}
            onChange={(v) => update((d) => ({ ...d, cutMethod: { ...d.cutMethod, machine: v } }))}
          />
          {s.cutMethod.machine ? (
            <Text
              label="Stroke speed"
              unit="mm/s"
              numeric
              value={s.cutMethod.strokeSpeedMmS}
              error={e("cutMethod.strokeSpeedMmS")}
              onChange={(v) => update((d) => ({ ...d, cutMethod: { ...d.cutMethod, strokeSpeedMmS: v } }))}
            />
          ) : (
            <Hidden error={e("cutMethod.strokeSpeedMmS")} />
          )}
          <Text
            label="Edge length under test"
            unit="mm"
            hint="Blades of different length are taped off to this length."
            numeric
            value={s.edgeLengthMm}
            error={e("edgeLengthMm")}
            onChange={(v) => update((d) => ({ ...d, edgeLengthMm: v }))}
          />
          <Text
            label="Replicates per blade"
            hint="Re-sharpen and re-test this many times."
            numeric
            value={s.replicatesPerBlade}
            error={e("replicatesPerBlade")}
            onChange={(v) => update((d) => ({ ...d, replicatesPerBlade: v }))}
          />
        </div>
      </Section>

      {edge ? (
        <Section title="Checks and stop rule">
          <p className="text-graphite-800">Baseline readings are always taken before the first cut.</p>
          <div className="grid gap-4 md:grid-cols-2">
            <Text
              label="Check after every"
              unit="cuts"
              numeric
              value={s.edgeForce.checkEveryCuts}
              error={e("edgeForce.checkEveryCuts")}
              onChange={(v) => update((d) => ({ ...d, edgeForce: { ...d.edgeForce, checkEveryCuts: v } }))}
            />
            <Choice
              label="A check is the … of its readings"
              value={s.edgeForce.aggregation}
              error={e("edgeForce.aggregation")}
              options={[
                { value: "mean", label: "Mean" },
                { value: "median", label: "Median" },
              ]}
              onChange={(v) => update((d) => ({ ...d, edgeForce: { ...d.edgeForce, aggregation: v as "mean" | "median" } }))}
            />
            <Text
              label="Threshold"
              unit="gf"
              numeric
              signal
              hint="A check at or above this is dull."
              value={s.edgeForce.thresholdGf}
              error={e("edgeForce.thresholdGf")}
              onChange={(v) => update((d) => ({ ...d, edgeForce: { ...d.edgeForce, thresholdGf: v } }))}
            />
            <Text
              label="Sharpness tester's maximum reading"
              unit="gf"
              numeric
              hint={testerHints.length ? `The lab's testers: ${testerHints.join("; ")}.` : "The threshold must stay below it."}
              value={s.edgeForce.testerMaxGf}
              error={e("edgeForce.testerMaxGf")}
              onChange={(v) => update((d) => ({ ...d, edgeForce: { ...d.edgeForce, testerMaxGf: v } }))}
            />
            <Check
              label="Confirm a reading at or above the threshold at a fresh spot of the edge"
              checked={s.edgeForce.confirmAtFreshSpot}
              error={e("edgeForce.confirmAtFreshSpot")}
              onChange={(v) => update((d) => ({ ...d, edgeForce: { ...d.edgeForce, confirmAtFreshSpot: v } }))}
            />
            <Text
              label="Cap on cuts"
              unit="cuts"
              numeric
              hint="A run that reaches the cap without crossing the threshold is censored."
              value={s.edgeForce.capCuts}
              error={e("edgeForce.capCuts")}
              onChange={(v) => update((d) => ({ ...d, edgeForce: { ...d.edgeForce, capCuts: v } }))}
            />
            <Text
              label="Working-sharpness horizon"
              unit="cuts"
              numeric
              hint="Working sharpness is the mean sharpness over the first K cuts; a run that ends before K is carried at its last check. Declare it before randomization; empty means the cap."
              value={s.edgeForce.workingHorizonCuts}
              error={e("edgeForce.workingHorizonCuts")}
              onChange={(v) => update((d) => ({ ...d, edgeForce: { ...d.edgeForce, workingHorizonCuts: v } }))}
            />
          </div>
          <ListHeading id="positions-title" title="Reading positions along the edge, in order" error={e("edgeForce.positions")} />
          <SortableList
            id="positions"
            noun="position"
            items={s.edgeForce.positions}
            describe={(v) => v || "unnamed"}
            onMove={(from, to) => update((d) => ({ ...d, edgeForce: { ...d.edgeForce, positions: moveItem(d.edgeForce.positions, from, to) } }))}
            rowActions={(item) => (
              <RemoveButton
                label={`Remove position ${item.value || "unnamed"}`}
                onClick={() => update((d) => ({ ...d, edgeForce: { ...d.edgeForce, positions: d.edgeForce.positions.filter((p) => p.key !== item.key) } }))}
              />
            )}
          >
            {(item, i) => (
              <Text
                label={`Position ${i + 1}`}
                value={item.value}
                error={e(`edgeForce.positions.${i}`)}
                onChange={(v) =>
                  update((d) => ({ ...d, edgeForce: { ...d.edgeForce, positions: d.edgeForce.positions.map((p) => (p.key === item.key ? { ...p, value: v } : p)) } }))
                }
              />
            )}
          </SortableList>
          <AddButton onClick={() => update((d) => ({ ...d, edgeForce: { ...d.edgeForce, positions: [...d.edgeForce.positions, keyed("")] } }))}>
            Add a reading position
          </AddButton>
        </Section>
      ) : (
        <Section title="Strokes and pass marks">
          <p className="text-graphite-800">
            {s.card.valuesSource === "from_memory"
              ? "These values follow ISO 8442-5 from memory: check them against the standard's text."
              : "These values were checked against the standard's text."}
          </p>
          <div className="grid gap-4 md:grid-cols-2">
            <Text
              label="Stroke count"
              unit="strokes"
              numeric
              value={s.card.strokeCount}
              error={e("card.strokeCount")}
              onChange={(v) => update((d) => ({ ...d, card: { ...d.card, strokeCount: v } }))}
            />
            <Text
              label="Strokes for initial cutting performance"
              unit="strokes"
              numeric
              value={s.card.initialStrokes}
              error={e("card.initialStrokes")}
              onChange={(v) => update((d) => ({ ...d, card: { ...d.card, initialStrokes: v } }))}
            />
            <Text
              label="Pass mark, initial cutting performance"
              unit="mm"
              numeric
              value={s.card.initialPassMm}
              error={e("card.initialPassMm")}
              onChange={(v) => update((d) => ({ ...d, card: { ...d.card, initialPassMm: v } }))}
            />
            <Text
              label="Pass mark, total card cut"
              unit="mm"
              numeric
              value={s.card.totalPassMm}
              error={e("card.totalPassMm")}
              onChange={(v) => update((d) => ({ ...d, card: { ...d.card, totalPassMm: v } }))}
            />
            <Choice
              label="Source of these values"
              value={s.card.valuesSource}
              error={e("card.valuesSource")}
              options={[
                { value: "from_memory", label: "From memory, not yet checked" },
                { value: "checked", label: "Checked against the standard's text" },
              ]}
              onChange={(v) => update((d) => ({ ...d, card: { ...d.card, valuesSource: v as CardSettings["valuesSource"] } }))}
            />
          </div>
        </Section>
      )}

      <Section title="Sharpening recipe">
        <ListHeading id="steps-title" title="Steps, in the order they are done" error={e("sharpening")} />
        <SortableList
          id="steps"
          noun="step"
          items={s.sharpening}
          describe={(v) => `${v.abrasive || "no abrasive yet"}, grit ${v.grit || "?"}`}
          onMove={(from, to) => update((d) => ({ ...d, sharpening: moveItem(d.sharpening, from, to) }))}
          rowActions={(item, i) => (
            <RemoveButton label={`Remove step ${i + 1}`} onClick={() => update((d) => ({ ...d, sharpening: d.sharpening.filter((x) => x.key !== item.key) }))} />
          )}
        >
          {(item, i) => {
            const set = (field: keyof StepForm) => (v: string) =>
              update((d) => ({ ...d, sharpening: d.sharpening.map((x) => (x.key === item.key ? { ...x, value: { ...x.value, [field]: v } } : x)) }));
            const p = `sharpening.${i}`;
            return (
              <div className="grid gap-3 md:grid-cols-3" data-step={i + 1}>
                <Text label="Abrasive" value={item.value.abrasive} error={e(`${p}.abrasive`)} onChange={set("abrasive")} />
                <Text label="Grit" value={item.value.grit} error={e(`${p}.grit`)} onChange={set("grit")} />
                <Text label="Angle per side" unit="degrees" numeric value={item.value.angleDegPerSide} error={e(`${p}.angleDegPerSide`)} onChange={set("angleDegPerSide")} />
                <Choice
                  label="Counted in"
                  value={item.value.amountKind}
                  error={e(`${p}.amountKind`)}
                  options={[
                    { value: "strokes", label: "Strokes" },
                    { value: "seconds", label: "Seconds" },
                  ]}
                  onChange={set("amountKind")}
                />
                <Text label={item.value.amountKind === "seconds" ? "Seconds" : "Strokes"} numeric value={item.value.amount} error={e(`${p}.amount`)} onChange={set("amount")} />
                <Text label="Deburring" value={item.value.deburring} error={e(`${p}.deburring`)} onChange={set("deburring")} />
              </div>
            );
          }}
        </SortableList>
        <AddButton
          onClick={() =>
            update((d) => ({
              ...d,
              sharpening: [...d.sharpening, keyed({ abrasive: "", grit: "", angleDegPerSide: d.sharpening.at(-1)?.value.angleDegPerSide ?? "20", amountKind: "strokes", amount: "", deburring: "" })],
            }))
          }
        >
          Add a sharpening step
        </AddButton>
      </Section>

      <Section title="Safety checklist">
        <p className="text-graphite-800">Ticked at the bench before the first cut. Your lab's own safety rules and local regulations come first.</p>
        <ListHeading id="checklist-title" title="Checklist items" error={e("safetyChecklist")} />
        <SortableList
          id="checklist"
          noun="checklist item"
          items={s.safetyChecklist}
          describe={(v) => v || "empty item"}
          onMove={(from, to) => update((d) => ({ ...d, safetyChecklist: moveItem(d.safetyChecklist, from, to) }))}
          rowActions={(item, i) => (
            <RemoveButton label={`Remove checklist item ${i + 1}`} onClick={() => update((d) => ({ ...d, safetyChecklist: d.safetyChecklist.filter((x) => x.key !== item.key) }))} />
          )}
        >
          {(item, i) => (
            <Text
              label={`Item ${i + 1}`}
              value={item.value}
              error={e(`safetyChecklist.${i}`)}
              onChange={(v) => update((d) => ({ ...d, safetyChecklist: d.safetyChecklist.map((x) => (x.key === item.key ? { ...x, value: v } : x)) }))}
            />
          )}
        </SortableList>
        <AddButton onClick={() => update((d) => ({ ...d, safetyChecklist: [...d.safetyChecklist, keyed("")] }))}>Add a checklist item</AddButton>
      </Section>
    </>
  );
  const unshown = Object.entries(errors).filter(([path]) => !shown.has(path) && path !== "_form");

  return (
    <Form method="post" className="flex flex-col gap-6" noValidate>
      <input type="hidden" name="content" value={JSON.stringify(toContentInput(s))} />
      <FormAlert message={formError ?? (errorCount ? `Nothing was saved: ${errorCount === 1 ? "one field needs" : `${errorCount} fields need`} attention, marked below.` : undefined)} />
      {unshown.length ? (
        <ul className="list-disc pl-6 font-bold text-fault">
          {unshown.map(([path, message]) => (
            <li key={path}>{message}</li>
          ))}
        </ul>
      ) : null}
      <FormAlert tone="ok" message={saved} />
      {fieldsBody}
      <div className="sticky bottom-0 flex flex-wrap gap-3 border-t border-rule bg-paper py-3">
        <SubmitButton intent="save">Save draft</SubmitButton>
        <SubmitButton intent="publish" tone="quiet">
          Save and publish
        </SubmitButton>
        <p className="self-center text-sm text-graphite-600">Publishing freezes this version for good; later changes make a new version.</p>
      </div>
    </Form>
  );
}

// ---------------------------------------------------------------------------
// Controlled inputs in Blindcut's look (the shared Field is uncontrolled).

function Section({ title, children }: { title: string; children: React.ReactNode }) {
  return (
    <fieldset className="flex flex-col gap-4 rounded-lg border border-rule bg-card p-4">
      <legend className="px-1 text-xl font-bold">{title}</legend>
      {children}
    </fieldset>
  );
}

function ErrorText({ id, error }: { id: string; error?: string }) {
  if (!error) return null;
  return (
    <p id={id} className="text-sm font-bold text-fault">
      <span aria-hidden="true">✕ </span>
      {error}
    </p>
  );
}

function Text({
  label,
  value,
  onChange,
  error,
  hint,
  unit,
  numeric,
  signal,
}: {
  label: string;
  value: string;
  onChange: (v: string) => void;
  error?: string;
  hint?: string;
  unit?: string;
  numeric?: boolean;
  signal?: boolean;
}) {
  const id = useId();
  const describedBy = [hint ? `${id}-hint` : null, error ? `${id}-error` : null].filter(Boolean).join(" ") || undefined;
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="font-bold">
        {signal ? <span className="mr-1 text-signal" aria-hidden="true">▲</span> : null}
        {label}
        {unit ? <span className="font-normal text-graphite-600"> ({unit})</span> : null}
      </label>
      {hint ? (
        <p id={`${id}-hint`} className="text-sm text-graphite-600">
          {hint}
        </p>
      ) : null}
      <input
        id={id}
        type="text"
        value={value}
        inputMode={numeric ? "decimal" : undefined}
        onChange={(ev) => onChange(ev.target.value)}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy}
        className={`min-h-target rounded border bg-card px-3 text-base ${numeric ? "figures" : ""} ${error ? "border-2 border-fault" : signal ? "border-signal" : "border-graphite-400"}`}
      />
      <ErrorText id={`${id}-error`} error={error} />
    </div>
  );
}

function TextArea({ label, value, onChange, error, hint }: { label: string; value: string; onChange: (v: string) => void; error?: string; hint?: string }) {
  const id = useId();
  const describedBy = [hint ? `${id}-hint` : null, error ? `${id}-error` : null].filter(Boolean).join(" ") || undefined;
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="font-bold">
        {label}
      </label>
      {hint ? (
        <p id={`${id}-hint`} className="text-sm text-graphite-600">
          {hint}
        </p>
      ) : null}
      <textarea
        id={id}
        value={value}
        rows={3}
        onChange={(ev) => onChange(ev.target.value)}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy}
        className={`rounded border bg-card p-3 text-base ${error ? "border-2 border-fault" : "border-graphite-400"}`}
      />
      <ErrorText id={`${id}-error`} error={error} />
    </div>
  );
}

function Choice({
  label,
  value,
  options,
  onChange,
  error,
  hint,
}: {
  label: string;
  value: string;
  options: { value: string; label: string }[];
  onChange: (v: string) => void;
  error?: string;
  hint?: string;
}) {
  const id = useId();
  const describedBy = [hint ? `${id}-hint` : null, error ? `${id}-error` : null].filter(Boolean).join(" ") || undefined;
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="font-bold">
        {label}
      </label>
      {hint ? (
        <p id={`${id}-hint`} className="text-sm text-graphite-600">
          {hint}
        </p>
      ) : null}
      <select
        id={id}
        value={value}
        onChange={(ev) => onChange(ev.target.value)}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy}
        className={`min-h-target rounded border bg-card px-3 ${error ? "border-2 border-fault" : "border-graphite-400"}`}
      >
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
      <ErrorText id={`${id}-error`} error={error} />
    </div>
  );
}

function Check({ label, checked, onChange, error }: { label: string; checked: boolean; onChange: (v: boolean) => void; error?: string }) {
  const id = useId();
  return (
    <div className="flex flex-col gap-1 self-end">
      <label htmlFor={id} className="flex min-h-target items-center gap-3 font-bold">
        <input
          id={id}
          type="checkbox"
          checked={checked}
          onChange={(ev) => onChange(ev.target.checked)}
          aria-invalid={error ? true : undefined}
          aria-describedby={error ? `${id}-error` : undefined}
          className="h-6 w-6 accent-ink"
        />
        {label}
      </label>
      <ErrorText id={`${id}-error`} error={error} />
    </div>
  );
}

/** A message for a field that is hidden in the current choice (e.g. a load when "by hand"). */
function Hidden({ error }: { error?: string }) {
  const id = useId();
  return <ErrorText id={id} error={error} />;
}

function ListHeading({ id, title, error }: { id: string; title: string; error?: string }) {
  return (
    <div>
      <h3 id={id} className="font-bold">
        {title}
      </h3>
      <p className="text-sm text-graphite-600">Drag a row by its handle, or focus the handle and press Space, then the arrow keys, then Space. Or use Move up and Move down.</p>
      <ErrorText id={`${id}-error`} error={error} />
    </div>
  );
}

function AddButton({ onClick, children }: { onClick: () => void; children: React.ReactNode }) {
  return (
    <button type="button" onClick={onClick} className="min-h-target self-start rounded border border-ink px-4 font-bold text-ink hover:bg-paper-deep">
      <span aria-hidden="true">+ </span>
      {children}
    </button>
  );
}

function RemoveButton({ label, onClick }: { label: string; onClick: () => void }) {
  return (
    <button type="button" onClick={onClick} aria-label={label} className="min-h-target rounded border border-graphite-400 bg-card px-2 text-sm font-bold text-graphite-800">
      <span aria-hidden="true">✕ </span>Remove
    </button>
  );
}
