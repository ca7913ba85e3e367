import { stateLook, type BadgeKind } from "~/lib/states.ts";

/** A state by word and shape as well as colour: the one badge for studies, runs, calibration and designer steps. */
export function StateBadge({ kind, state, word, testId, children }: { kind: BadgeKind; state: string; word?: string; testId?: string; children?: React.ReactNode }) {
  const look = stateLook(kind, state);
  return (
    <span data-testid={testId} data-kind={kind} data-state={state} className={`inline-flex items-center gap-1 rounded border-2 px-2 py-0.5 text-sm font-bold ${look.cls}`}>
      <span aria-hidden="true">{look.shape}</span> {word ?? look.word}
      {children}
    </span>
  );
}
