import { REASON_CATEGORIES, type ReasonCategory } from "~/domain/reason-categories.ts";

/** The fixed list of reason categories: what blinded readers see of a withdrawal or reassignment. */
export function ReasonCategorySelect({ defaultValue = "other" }: { defaultValue?: ReasonCategory }) {
  return (
    <label className="flex flex-col gap-1 font-bold">
      Reason category (shown to blinded readers)
      <select name="category" defaultValue={defaultValue} className="min-h-target rounded border border-graphite-400 bg-card px-2">
        {Object.entries(REASON_CATEGORIES).map(([key, label]) => (
          <option key={key} value={key}>{label}</option>
        ))}
      </select>
    </label>
  );
}
