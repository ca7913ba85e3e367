// An arm's or condition's own sharpening recipe: an ordered list of steps, reordered
// with the shared SortableList (drag and drop, keyboard, Move up / Move down). The
// fields are named recipe.<n>.<field>, so the form posts the list in its order.
import { useId, useState } from "react";
import { SortableList, moveItem, type Keyed } from "./sortable-list.tsx";
import type { SharpeningStep } from "~/domain/protocol.ts";

type StepDraft = { abrasive: string; grit: string; angleDegPerSide: string; amountKind: string; amount: string; deburring: string };

const toDraft = (s: SharpeningStep): StepDraft => ({
  abrasive: s.abrasive,
  grit: s.grit,
  angleDegPerSide: String(s.angleDegPerSide),
  amountKind: s.amountKind,
  amount: String(s.amount),
  deburring: s.deburring,
});

let counter = 0;
const keyed = (value: StepDraft): Keyed<StepDraft> => ({ key: `step-${++counter}`, value });

export function RecipeEditor({ listId, initial, errors }: { listId: string; initial: SharpeningStep[]; errors: Record<string, string> }) {
  const [items, setItems] = useState<Keyed<StepDraft>[]>(() => initial.map((s, i) => ({ key: `${listId}-${i}`, value: toDraft(s) })));
  const set = (index: number, field: keyof StepDraft, value: string) =>
    setItems((list) => list.map((item, i) => (i === index ? { ...item, value: { ...item.value, [field]: value } } : item)));
  return (
    <div className="flex flex-col gap-2">
      <SortableList
        id={listId}
        noun="step"
        items={items}
        describe={(v) => `${v.abrasive || "unnamed"} ${v.grit}`}
        onMove={(from, to) => setItems((list) => moveItem(list, from, to))}
        rowActions={(_, index) => (
          <button
            type="button"
            onClick={() => setItems((list) => list.filter((_, i) => i !== index))}
            className="min-h-target rounded border border-fault bg-card px-2 text-sm font-bold text-fault"
          >
            Remove
          </button>
        )}
      >
        {(item, index) => <StepFields index={index} value={item.value} onChange={(f, v) => set(index, f, v)} errors={errors} />}
      </SortableList>
      <p>
        <button
          type="button"
          onClick={() => setItems((list) => [...list, keyed({ abrasive: "", grit: "", angleDegPerSide: "20", amountKind: "strokes", amount: "10", deburring: "" })])}
          className="min-h-target rounded border border-graphite-400 bg-card px-3 font-bold"
        >
          Add a step
        </button>
      </p>
      {errors.recipe ? <p className="text-sm font-bold text-fault">✕ {errors.recipe}</p> : null}
    </div>
  );
}

function StepFields({ index, value, onChange, errors }: { index: number; value: StepDraft; onChange: (field: keyof StepDraft, v: string) => void; errors: Record<string, string> }) {
  const id = useId();
  const field = (name: keyof StepDraft, label: string, props: React.InputHTMLAttributes<HTMLInputElement> = {}) => {
    const error = errors[`recipe.${index}.${name}`];
    return (
      <div className="flex flex-col gap-1">
        <label htmlFor={`${id}-${name}`} className="text-sm font-bold">
          {label}
        </label>
        <input
          id={`${id}-${name}`}
          name={`recipe.${index}.${name}`}
          value={value[name]}
          onChange={(e) => onChange(name, e.target.value)}
          aria-invalid={error ? true : undefined}
          className={`min-h-target rounded border bg-card px-2 ${error ? "border-fault" : "border-graphite-400"}`}
          {...props}
        />
        {error ? <p className="text-sm font-bold text-fault">✕ {error}</p> : null}
      </div>
    );
  };
  return (
    <div className="grid gap-2 sm:grid-cols-3">
      {field("abrasive", "Abrasive")}
      {field("grit", "Grit")}
      {field("angleDegPerSide", "Angle per side (°)", { inputMode: "decimal" })}
      <div className="flex flex-col gap-1">
        <label htmlFor={`${id}-kind`} className="text-sm font-bold">
          Counted in
        </label>
        <select id={`${id}-kind`} name={`recipe.${index}.amountKind`} value={value.amountKind} onChange={(e) => onChange("amountKind", e.target.value)} className="min-h-target rounded border border-graphite-400 bg-card px-2">
          <option value="strokes">strokes</option>
          <option value="seconds">seconds</option>
        </select>
      </div>
      {field("amount", "Strokes or seconds", { inputMode: "numeric" })}
      {field("deburring", "Deburring")}
    </div>
  );
}
