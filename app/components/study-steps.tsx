import { NavLink } from "react-router";
import { STEP_LABELS, type StepId } from "~/lib/study-input.ts";

/** The designer's steps, each marked complete or not by word and shape; any step can be opened, left and resumed. */
export function StudySteps({ labId, studyId, steps, current }: { labId: string; studyId: string; steps: { id: StepId; complete: boolean }[]; current?: string }) {
  const base = `/labs/${labId}/studies/${studyId}`;
  return (
    <nav aria-label="Design steps" className="mb-6">
      <ol className="flex flex-wrap gap-2">
        {steps.map((s, i) => (
          <li key={s.id}>
            <NavLink
              to={`${base}/design/${s.id}`}
              aria-current={current === s.id ? "step" : undefined}
              className={`inline-flex min-h-target items-center gap-2 rounded border px-3 text-sm font-bold no-underline ${current === s.id ? "border-2 border-ink bg-card text-graphite-950" : "border-rule bg-card text-graphite-800 hover:border-ink"}`}
            >
              <span aria-hidden="true" className={s.complete ? "text-ok" : "text-graphite-400"}>{s.complete ? "✓" : "○"}</span>
              <span className="figures">{i + 1}.</span> {STEP_LABELS[s.id]}
              <span className="sr-only">{s.complete ? " (complete)" : " (to do)"}</span>
            </NavLink>
          </li>
        ))}
        <li>
          <NavLink
            to={`${base}/randomize`}
            className={`inline-flex min-h-target items-center gap-2 rounded border px-3 text-sm font-bold no-underline ${current === "randomize" ? "border-2 border-ink bg-card" : "border-rule bg-card text-graphite-800 hover:border-ink"}`}
          >
            <span aria-hidden="true">◇</span> Review and randomize
          </NavLink>
        </li>
      </ol>
    </nav>
  );
}

export function ProblemList({ problems, title = "Before this study can be randomized" }: { problems: string[]; title?: string }) {
  if (problems.length === 0) {
    return (
      <div role="status" className="rounded border-l-4 border-ok bg-ok-soft p-3 font-bold text-ok">
        <span aria-hidden="true">✓ </span>The design is complete: it can be randomized.
      </div>
    );
  }
  return (
    <section aria-labelledby="problems-title" className="rounded border-l-4 border-signal bg-signal-soft p-3" data-testid="design-problems">
      <h2 id="problems-title" className="font-bold">
        <span aria-hidden="true">▲ </span>
        {title} ({problems.length} to do)
      </h2>
      <ul className="mt-2 list-disc pl-6">
        {problems.map((p) => (
          <li key={p}>{p}</li>
        ))}
      </ul>
    </section>
  );
}
