// One word and one shape for each state across the app, so colour is never the only signal.
// Shared by server modules (home sections) and components (StateBadge).

export type BadgeKind = "study" | "run" | "calibration" | "step";
export type StateLook = { word: string; shape: string; cls: string };

export const STATE_LOOKS: Record<BadgeKind, Record<string, StateLook>> = {
  study: {
    draft: { word: "Draft", shape: "□", cls: "border-dashed border-graphite-400 text-graphite-600" },
    randomized: { word: "Randomized", shape: "◇", cls: "border-ink text-ink" },
    running: { word: "Running", shape: "▶", cls: "border-signal text-signal" },
    closed: { word: "Closed, blinded", shape: "■", cls: "border-graphite-800 text-graphite-950" },
    unblinded: { word: "Unblinded", shape: "◆", cls: "border-ok text-ok" },
  },
  run: {
    waiting: { word: "Waiting", shape: "◷", cls: "border-graphite-400 text-graphite-800" },
    in_progress: { word: "In progress", shape: "◐", cls: "border-ink text-ink" },
    ended_threshold: { word: "Ended", shape: "▼", cls: "border-signal text-signal" },
    censored: { word: "Censored at the cap", shape: "▣", cls: "border-graphite-800 text-graphite-800" },
    withdrawn: { word: "Withdrawn", shape: "✕", cls: "border-graphite-400 text-graphite-600 line-through" },
  },
  calibration: {
    current: { word: "Calibrated", shape: "●", cls: "border-ok bg-ok-soft text-ok" },
    due_soon: { word: "Due soon", shape: "◔", cls: "border-ink text-ink" },
    never_checked: { word: "Never checked", shape: "◌", cls: "border-signal bg-signal-soft text-signal" },
    failed: { word: "Last check failed", shape: "⊗", cls: "border-signal bg-signal-soft text-signal" },
    lapsed: { word: "Calibration lapsed", shape: "▲", cls: "border-signal bg-signal-soft text-signal" },
  },
  step: {
    complete: { word: "Complete", shape: "✓", cls: "border-ok text-ok" },
    todo: { word: "To do", shape: "○", cls: "border-graphite-400 text-graphite-600" },
  },
};

export function stateLook(kind: BadgeKind, state: string): StateLook {
  const look = STATE_LOOKS[kind][state];
  if (!look) throw new Error(`stateLook: unknown ${kind} state "${state}"`);
  return look;
}
