// The flow of blades and runs per arm: a table (results page and report) and a
// flow diagram drawn on the server as boxes and arrows (report). Arms appear under
// their neutral labels until unblinding; names are added beside them afterwards.
import { reasonCategoryLabel } from "~/domain/reason-categories.ts";
import type { ArmFlow } from "~/domain/study-analysis.ts";

/** One arm's flow as the domain counts it (ArmFlow), with its display name beside the neutral label. */
export type ArmFlowRow = Omit<ArmFlow, "armKey"> & { arm: { key: string; name: string | null } };

const armTitle = (a: ArmFlowRow["arm"]) => (a.name ? `${a.key} · ${a.name}` : a.key);
const categories = (f: ArmFlowRow) => (f.withdrawnByCategory.length ? f.withdrawnByCategory.map((c) => `${reasonCategoryLabel(c.category)}: ${c.runs}`).join("; ") : "—");

export function FlowPerArmTable({ flow, design }: { flow: ArmFlowRow[]; design: string }) {
  if (!flow.length) return null;
  const unit = design === "within_blade" ? "Condition" : "Arm";
  const rows: [string, (f: ArmFlowRow) => string | number][] = [
    [design === "within_blade" ? "Blades tested" : "Blades enrolled", (f) => f.bladesEnrolled],
    ["Runs scheduled", (f) => f.runsScheduled],
    ["Failed sharpening attempts", (f) => f.failedSharpeningAttempts],
    ["Runs ended at the threshold", (f) => f.endedAtThreshold],
    ["Runs censored at the cap", (f) => f.censored],
    ["Runs withdrawn", (f) => f.withdrawn],
    ["Withdrawn, by reason category", categories],
    ["Runs left out (no value)", (f) => f.excluded],
    ["Runs analysed", (f) => f.runsAnalysed],
    ["Blades analysed", (f) => f.bladesAnalysed],
  ];
  return (
    <table className="figures w-full border-collapse text-left" data-testid="flow-per-arm">
      <caption className="caption-bottom pt-1 text-left text-sm text-graphite-600">
        Counts per {unit.toLowerCase()}; blades are the unit of analysis, runs are their replicates. Withdrawn runs are counted by the category of their reason only.
      </caption>
      <thead>
        <tr className="border-b-2 border-graphite-800">
          <th scope="col" className="py-1 pr-3">Stage</th>
          {flow.map((f) => <th key={f.arm.key} scope="col" className="py-1 pr-3">{armTitle(f.arm)}</th>)}
        </tr>
      </thead>
      <tbody>
        {rows.map(([label, value]) => (
          <tr key={label} className="border-b border-rule">
            <th scope="row" className="py-1 pr-3 font-normal">{label}</th>
            {flow.map((f) => <td key={f.arm.key} className="py-1 pr-3">{value(f)}</td>)}
          </tr>
        ))}
      </tbody>
    </table>
  );
}

/** Boxes and arrows: blades enrolled → allocated to each arm → runs completed → analysed. */
export function FlowDiagram({ flow, enrolledBlades, design }: { flow: ArmFlowRow[]; enrolledBlades: number; design: string }) {
  if (!flow.length) return null;
  const allocated = design === "within_blade" ? "tested under" : "allocated to";
  return (
    <figure className="flex flex-col items-center gap-1 print:break-inside-avoid" data-testid="flow-diagram" aria-label="Flow diagram of blades and runs per arm">
      <Box>{`Blades enrolled: ${enrolledBlades}`}</Box>
      <Arrow />
      <div className="grid w-full gap-3" style={{ gridTemplateColumns: `repeat(${flow.length}, minmax(0, 1fr))` }}>
        {flow.map((f) => (
          <div key={f.arm.key} className="flex flex-col items-center gap-1">
            <Box>
              <strong>{armTitle(f.arm)}</strong>
              <br />
              {`${f.bladesEnrolled} blades ${allocated} it, ${f.runsScheduled} runs scheduled`}
            </Box>
            <Arrow />
            <Box>
              {`Runs completed: ${f.endedAtThreshold + f.censored}`}
              <br />
              {`ended at threshold ${f.endedAtThreshold}, censored at the cap ${f.censored}`}
              {f.failedSharpeningAttempts ? <><br />{`failed sharpening attempts ${f.failedSharpeningAttempts}`}</> : null}
            </Box>
            {f.withdrawn ? <p className="text-center text-sm">{`Withdrawn ${f.withdrawn} (${categories(f)})`}</p> : null}
            <Arrow />
            <Box>
              {`Analysed: ${f.bladesAnalysed} blades, ${f.runsAnalysed} runs`}
              {f.excluded ? <><br />{`left out with no value ${f.excluded}`}</> : null}
            </Box>
          </div>
        ))}
      </div>
      <figcaption className="mt-1 text-sm text-graphite-600">{`Flow of blades and runs, per ${design === "within_blade" ? "condition" : "arm"}.`}</figcaption>
    </figure>
  );
}

function Box({ children }: { children: React.ReactNode }) {
  return <div className="w-full rounded border-2 border-graphite-800 bg-card px-3 py-2 text-center">{children}</div>;
}

function Arrow() {
  return (
    <svg width="16" height="22" viewBox="0 0 16 22" aria-hidden="true" className="text-graphite-800">
      <line x1="8" y1="0" x2="8" y2="16" stroke="currentColor" strokeWidth="2" />
      <polygon points="2,14 14,14 8,22" fill="currentColor" />
    </svg>
  );
}
