import type { RunState } from "~/server/db/schema/studies.ts";

// A run's state by word and shape as well as colour (colour-blind safe).
const LOOK: Record<RunState, { shape: string; cls: string }> = {
  waiting: { shape: "○", cls: "border-graphite-400 text-graphite-800" },
  in_progress: { shape: "◐", cls: "border-ink text-ink" },
  ended_threshold: { shape: "■", cls: "border-signal text-signal" },
  censored: { shape: "▣", cls: "border-graphite-800 text-graphite-800" },
  withdrawn: { shape: "✕", cls: "border-graphite-400 text-graphite-600 line-through" },
};

export function RunStateBadge({ state, words }: { state: RunState; words: string }) {
  const look = LOOK[state];
  return (
    <span data-testid="run-state" data-state={state} className={`inline-flex items-center gap-1 rounded border px-2 py-0.5 text-sm font-bold ${look.cls}`}>
      <span aria-hidden="true">{look.shape}</span>
      {words}
    </span>
  );
}
