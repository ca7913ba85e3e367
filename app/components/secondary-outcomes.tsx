import { FormAlert } from "./form.tsx";
import { armLabel, fmt, fmtInterval, fmtP, fmtPercent } from "~/lib/format.ts";
import type { ResultsView } from "./results-tables.tsx";

/** The rule of an outcome whose definition depends on the protocol (working sharpness), where it is named. */
export function OutcomeDefinition({ outcome }: { outcome: { label: string; definition?: string | null } }) {
  if (!outcome.definition) return null;
  return (
    <p className="max-w-prose text-graphite-800" data-testid="outcome-definition">
      <strong>{outcome.label}.</strong> {outcome.definition}
    </p>
  );
}

const th = "py-2 pr-3";
const num = "py-2 pr-3 text-right";

/**
 * Each declared secondary outcome, analysed like the primary (descriptives, comparisons,
 * effect sizes), in its own section under the primary's, marked as supportive.
 */
export function SecondaryOutcomes({ sections }: { sections: ResultsView["secondary"] | undefined }) {
  if (!sections?.length) return null;
  return (
    <section aria-labelledby="secondary-outcomes" className="mt-8 grid gap-6" data-testid="secondary-outcomes">
      <div>
        <h2 id="secondary-outcomes" className="text-xl font-bold">Secondary outcomes</h2>
        <p className="mt-1 max-w-prose rounded border-l-4 border-graphite-400 bg-card p-3 font-bold">
          Secondary: no adjustment across outcomes; read as supportive. The primary outcome above is the study's answer; Holm's adjustment
          below runs over the comparisons within each outcome only.
        </p>
      </div>
      {sections.map((s) => (
        <SecondarySection key={s.outcome.key} view={s} />
      ))}
    </section>
  );
}

function SecondarySection({ view }: { view: ResultsView["secondary"][number] }) {
  const id = `secondary-${view.outcome.key}`;
  const unit = view.outcome.unit;
  return (
    <section aria-labelledby={id} className="rounded-lg border border-rule p-4" data-testid="secondary-section">
      <h3 id={id} className="text-lg font-bold">
        <span className="mr-2 rounded border border-graphite-600 px-1.5 text-sm font-bold text-graphite-600">Secondary</span>
        {view.outcome.label}{unit ? ` (${unit})` : ""}
      </h3>
      <p className="mb-2 text-sm text-graphite-600">{view.note} Blade is the unit: each blade's replicates are averaged first. {view.nBlades} blades, {view.nRuns} runs.</p>
      <OutcomeDefinition outcome={view.outcome} />
      {view.error ? <FormAlert message={`Not analysed: ${view.error}`} /> : null}
      {view.warnings.length ? (
        <ul className="my-2 rounded border-l-4 border-signal bg-signal-soft p-3" aria-label={`Warnings, ${view.outcome.label}`}>
          {view.warnings.map((w) => (
            <li key={w} className="font-bold text-graphite-950"><span aria-hidden="true" className="text-signal">▲ </span>{w}</li>
          ))}
        </ul>
      ) : null}
      {view.arms.length ? (
        <div className="mt-2 overflow-x-auto">
          <table className="figures w-full border-collapse text-left" aria-label={`${view.outcome.label} by arm`}>
            <thead>
              <tr className="border-b-2 border-graphite-800">
                <th scope="col" className={th}>Arm</th>
                <th scope="col" className={num}>Blades</th>
                <th scope="col" className={num}>Runs</th>
                <th scope="col" className={num}>Mean</th>
                <th scope="col" className={num}>SD</th>
                <th scope="col" className={num}>Median</th>
                <th scope="col" className={th}>95 % t-interval</th>
                <th scope="col" className={th}>95 % bootstrap</th>
                <th scope="col" className={num}>Censored</th>
              </tr>
            </thead>
            <tbody>
              {view.arms.map((a) => (
                <tr key={a.arm.key} className="border-b border-rule">
                  <th scope="row" className={`${th} font-bold`}>{armLabel(a.arm)}</th>
                  <td className={num}>{a.nBlades}</td>
                  <td className={num}>{a.nRuns}</td>
                  <td className={num}>{a.lowerBound ? "≥ " : ""}{fmt(a.mean, 2)}</td>
                  <td className={num}>{fmt(a.sd, 2)}</td>
                  <td className={num}>{fmt(a.median, 2)}</td>
                  <td className={th}>{fmtInterval(a.tInterval, 2)}</td>
                  <td className={th}>{fmtInterval(a.bootstrap, 2)}</td>
                  <td className={num}>{fmtPercent(a.censoredShare)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
      {view.comparisons.length ? (
        <div className="mt-3 overflow-x-auto">
          <table className="figures w-full border-collapse text-left" aria-label={`${view.outcome.label}, comparisons`}>
            <thead>
              <tr className="border-b-2 border-graphite-800">
                <th scope="col" className={th}>Comparison</th>
                <th scope="col" className={num}>Difference{unit ? ` (${unit})` : ""}</th>
                <th scope="col" className={th}>95 % interval</th>
                <th scope="col" className={num}>Hedges' g</th>
                <th scope="col" className={th}>95 % interval of g</th>
                <th scope="col" className={num}>p</th>
                <th scope="col" className={num}>Holm p (within this outcome)</th>
                <th scope="col" className={th}>Method</th>
              </tr>
            </thead>
            <tbody>
              {view.comparisons.map((c) => (
                <tr key={`${c.a.key}-${c.b.key}`} className="border-b border-rule align-top">
                  <th scope="row" className={`${th} font-bold`}>{armLabel(c.a)} − {armLabel(c.b)}</th>
                  <td className={num}>{fmt(c.difference, 2)}</td>
                  <td className={th}>{fmtInterval(c.differenceInterval, 2)}</td>
                  <td className={num}>{fmt(c.g, 2)}</td>
                  <td className={th}>{fmtInterval(c.gInterval, 2)}</td>
                  <td className={num}>{fmtP(c.p)}</td>
                  <td className={num}>{fmtP(c.pHolm)}</td>
                  <td className={`${th} text-sm`}>{c.method} (df {fmt(c.df, 1)}); {c.gMethod}; Mann–Whitney p {fmtP(c.mannWhitneyP)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
      {view.withinBlade.length ? (
        <div className="mt-3 overflow-x-auto">
          <table className="figures w-full border-collapse text-left" aria-label={`${view.outcome.label}, within-blade differences`}>
            <thead>
              <tr className="border-b-2 border-graphite-800">
                <th scope="col" className={th}>Conditions</th>
                <th scope="col" className={num}>Blades</th>
                <th scope="col" className={num}>Mean difference</th>
                <th scope="col" className={th}>95 % paired t interval</th>
                <th scope="col" className={num}>d<sub>z</sub></th>
                <th scope="col" className={th}>95 % interval of d<sub>z</sub></th>
                <th scope="col" className={num}>p (paired t)</th>
                <th scope="col" className={num}>Holm p (within this outcome)</th>
              </tr>
            </thead>
            <tbody>
              {view.withinBlade.map((w) => (
                <tr key={`${w.a.key}-${w.b.key}`} className="border-b border-rule">
                  <th scope="row" className={`${th} font-bold`}>{armLabel(w.a)} − {armLabel(w.b)}</th>
                  <td className={num}>{w.nBlades}</td>
                  <td className={num}>{fmt(w.meanDifference, 2)}</td>
                  <td className={th}>{fmtInterval(w.pairedInterval, 2)}</td>
                  <td className={num}>{fmt(w.dz, 2)}</td>
                  <td className={th}>{fmtInterval(w.dzInterval, 2)}</td>
                  <td className={num}>{fmtP(w.p)}</td>
                  <td className={num}>{fmtP(w.pHolm)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
    </section>
  );
}
