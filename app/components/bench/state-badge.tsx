import type { RunState } from "~/server/db/schema/studies.ts";
import { StateBadge } from "../state-badge.tsx";

export function RunStateBadge({ state, words }: { state: RunState; words?: string }) {
  return <StateBadge kind="run" state={state} word={words} testId="run-state" />;
}
