import type { StudyState } from "~/server/db/schema/studies.ts";

// A study's state by word and shape as well as colour (colour-blind safe).
const STATES: Record<StudyState, { word: string; shape: string; cls: string }> = {
  draft: { word: "Draft", shape: "□", cls: "border-dashed border-graphite-400 text-graphite-600" },
  randomized: { word: "Randomized", shape: "◇", cls: "border-ink text-ink" },
  running: { word: "Running", shape: "▶", cls: "border-signal text-signal" },
  closed: { word: "Closed", shape: "■", cls: "border-graphite-800 text-graphite-950" },
  unblinded: { word: "Unblinded", shape: "◉", cls: "border-ok text-ok" },
};

export function StudyStateBadge({ state }: { state: StudyState }) {
  const s = STATES[state];
  return (
    <span data-state={state} className={`inline-flex items-center gap-1 rounded border-2 px-2 py-0.5 text-sm font-bold ${s.cls}`}>
      <span aria-hidden="true">{s.shape}</span> {s.word}
    </span>
  );
}
