import type { CalibrationStatus } from "~/domain/calibration.ts";
import { StateBadge } from "./state-badge.tsx";
import { formatDate } from "~/lib/dates.ts";

/** Calibration state by word and shape as well as colour. */
export function CalibrationBadge({ status }: { status: CalibrationStatus }) {
  return (
    <span data-flagged={status.flagged ? "true" : "false"}>
      <StateBadge kind="calibration" state={status.state}>
        {status.dueOn && !status.flagged ? <span className="figures font-normal"> · due {formatDate(status.dueOn)}</span> : null}
      </StateBadge>
    </span>
  );
}
