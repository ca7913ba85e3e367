import type { StudyState } from "~/server/db/schema/studies.ts";
import { StateBadge } from "./state-badge.tsx";

export function StudyStateBadge({ state }: { state: StudyState }) {
  return <StateBadge kind="study" state={state} />;
}
