import { FormAlert } from "./form.tsx";
import { armLabel, fmt, fmtInterval, fmtP, fmtPercent } from "~/lib/format.ts";
import type { resultsView } from "~/server/analysis/results.server.ts";

export type ResultsView = ReturnType<typeof resultsView>;

/** The results as tables: arm summary, comparisons, within-blade differences, warnings. */
export function ResultsTables({ view }: { view: ResultsView }) {
  const unit = view.outcome.unit;
  return (
    <div className="grid gap-8">
      {view.error ? <FormAlert message={`The analysis could not be completed: ${view.error}`} /> : null}
      {view.warnings.length ? (
        <ul className="rounded border-l-4 border-signal bg-signal-soft p-3" aria-label="Warnings">
          {view.warnings.map((w) => (
            <li key={w} className="font-bold text-graphite-950"><span aria-hidden="true" className="text-signal">▲ </span>{w}</li>
          ))}
        </ul>
      ) : null}
      {view.arms.length ? (
        <section aria-labelledby="arm-summary">
          <h2 id="arm-summary" className="mb-1 text-xl font-bold">{view.outcome.label} by arm ({unit})</h2>
          <p className="mb-3 text-graphite-600">Blade is the unit: each blade's replicates are averaged first. {view.nBlades} blades, {view.nRuns} runs.</p>
          <div className="overflow-x-auto">
            <table className="figures w-full border-collapse text-left" data-testid="arm-table">
              <thead>
                <tr className="border-b-2 border-graphite-800">
                  <th scope="col" className="py-2 pr-3">Arm</th>
                  <th scope="col" className="py-2 pr-3 text-right">Blades</th>
                  <th scope="col" className="py-2 pr-3 text-right">Runs</th>
                  <th scope="col" className="py-2 pr-3 text-right">Mean</th>
                  <th scope="col" className="py-2 pr-3 text-right">SD</th>
                  <th scope="col" className="py-2 pr-3 text-right">Median</th>
                  <th scope="col" className="py-2 pr-3">95 % t-interval</th>
                  <th scope="col" className="py-2 pr-3">95 % bootstrap</th>
                  <th scope="col" className="py-2 pr-3 text-right">Censored</th>
                  {view.rmstTau ? <th scope="col" className="py-2 pr-3">RMST to {view.rmstTau} cuts (SE; 95 % interval)</th> : null}
                </tr>
              </thead>
              <tbody>
                {view.arms.map((a) => (
                  <tr key={a.arm.key} className="border-b border-rule">
                    <th scope="row" className="py-2 pr-3 font-bold" data-testid="arm-label">{armLabel(a.arm)}</th>
                    <td className="py-2 pr-3 text-right">{a.nBlades}</td>
                    <td className="py-2 pr-3 text-right">{a.nRuns}</td>
                    <td className="py-2 pr-3 text-right">{a.lowerBound ? <abbr title="a lower bound: censored runs enter at the cap">≥ </abbr> : ""}{fmt(a.mean, 2)}{a.lowerBound ? <span className="sr-only"> (a lower bound)</span> : null}</td>
                    <td className="py-2 pr-3 text-right">{fmt(a.sd, 2)}</td>
                    <td className="py-2 pr-3 text-right">{fmt(a.median, 2)}</td>
                    <td className="py-2 pr-3">{fmtInterval(a.tInterval, 2)}</td>
                    <td className="py-2 pr-3">
                      {fmtInterval(a.bootstrap, 2)}
                      {a.bootstrapDistinctResamples !== null && a.bootstrapDistinctResamples !== undefined ? <span className="block text-sm text-graphite-600">{a.bootstrapDistinctResamples} distinct resamples</span> : null}
                    </td>
                    <td className="py-2 pr-3 text-right">{fmtPercent(a.censoredShare)}</td>
                    {view.rmstTau ? (
                      <td className="py-2 pr-3" data-testid="arm-rmst">{a.rmst ? `${fmt(a.rmst.estimate, 2)} (${fmt(a.rmst.se, 2)}; ${fmtInterval(a.rmst, 2)})` : "—"}</td>
                    ) : null}
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          {view.arms.some((a) => a.censorWarning) ? (
            <ul className="mt-2 text-sm" data-testid="arm-censor-notes">
              {view.arms.filter((a) => a.censorWarning).map((a) => <li key={a.arm.key}>▲ {a.censorWarning}</li>)}
            </ul>
          ) : null}
          {view.rmstTau ? (
            <p className="mt-2 text-sm text-graphite-800">
              RMST: restricted mean survival time, the area under each arm's Kaplan–Meier curve from 0 to the cap ({view.rmstTau} cuts), runs as units (Royston &amp; Parmar 2013); the mean-type summary that censored runs do not bias. Shown because some runs are censored.
            </p>
          ) : null}
          {view.arms.some((a) => a.nBlades < 10) ? (
            <p className="mt-1 text-sm text-graphite-800">Bootstrap: with fewer than 10 blades per arm the percentile bootstrap has few distinct resamples (4 blades: 35), so its interval is coarse and too narrow.</p>
          ) : null}
        </section>
      ) : null}
      {view.comparisons.length ? (
        <section aria-labelledby="comparisons">
          <h2 id="comparisons" className="mb-3 text-xl font-bold">Comparisons</h2>
          <div className="overflow-x-auto">
            <table className="figures w-full border-collapse text-left" data-testid="comparison-table">
              <thead>
                <tr className="border-b-2 border-graphite-800">
                  <th scope="col" className="py-2 pr-3">Comparison</th>
                  <th scope="col" className="py-2 pr-3 text-right">Difference ({unit})</th>
                  <th scope="col" className="py-2 pr-3">95 % interval</th>
                  <th scope="col" className="py-2 pr-3 text-right">Hedges' g</th>
                  <th scope="col" className="py-2 pr-3">95 % interval of g</th>
                  <th scope="col" className="py-2 pr-3 text-right">p</th>
                  <th scope="col" className="py-2 pr-3 text-right">Holm p (intervals not adjusted)</th>
                  <th scope="col" className="py-2 pr-3">Method</th>
                </tr>
              </thead>
              <tbody>
                {view.comparisons.map((c) => (
                  <tr key={`${c.a.key}-${c.b.key}`} className="border-b border-rule align-top">
                    <th scope="row" className="py-2 pr-3 font-bold">{armLabel(c.a)} − {armLabel(c.b)}</th>
                    <td className="py-2 pr-3 text-right">{fmt(c.difference, 2)}</td>
                    <td className="py-2 pr-3">{fmtInterval(c.differenceInterval, 2)}</td>
                    <td className="py-2 pr-3 text-right">{fmt(c.g, 2)}</td>
                    <td className="py-2 pr-3">{fmtInterval(c.gInterval, 2)}</td>
                    <td className="py-2 pr-3 text-right">{fmtP(c.p)}</td>
                    <td className="py-2 pr-3 text-right">{fmtP(c.pHolm)}</td>
                    <td className="py-2 pr-3 text-sm">
                      {c.method} (df {fmt(c.df, 1)}); {c.gMethod}; Mann–Whitney p {fmtP(c.mannWhitneyP)} ({c.mannWhitneyMethod}), Holm {fmtP(c.mannWhitneyPHolm)}
                      {c.rmstDifference ? (
                        <span className="block" data-testid="comparison-rmst">
                          RMST difference to {c.rmstDifference.tau} cuts: {fmt(c.rmstDifference.difference, 2)} ({fmtInterval(c.rmstDifference, 2)}), p {fmtP(c.rmstDifference.p)} (z test, runs as units)
                        </span>
                      ) : null}
                      {c.censorWarning ? <span className="mt-1 block font-bold text-graphite-950" data-testid="comparison-censor-warning">▲ {c.censorWarning}</span> : null}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          {view.holmNote ? <p className="mt-2 text-sm text-graphite-800">{view.holmNote}</p> : null}
          {view.logRank ? (
            <p className="mt-3" data-testid="log-rank">
              Log-rank test over runs: χ² = <span className="figures">{fmt(view.logRank.chiSquare, 2)}</span> on {view.logRank.df} df,{" "}
              {view.logRank.validForInference ? (
                <>p = <span className="figures">{fmtP(view.logRank.p)}</span>. {view.survivalNote}</>
              ) : (
                <>p = <span className="figures">{fmtP(view.logRank.p)}</span>, <strong>not valid for inference when blades have replicates</strong> (runs of one blade are not independent; read the blade-level comparison above). {view.survivalNote}</>
              )}
            </p>
          ) : null}
        </section>
      ) : null}
      {view.withinBlade.length ? (
        <section aria-labelledby="within">
          <h2 id="within" className="mb-1 text-xl font-bold">Within-blade differences ({unit})</h2>
          <p className="mb-3 text-graphite-600">The per-blade difference between conditions is the unit.</p>
          <div className="overflow-x-auto">
            <table className="figures w-full border-collapse text-left" data-testid="within-table">
              <thead>
                <tr className="border-b-2 border-graphite-800">
                  <th scope="col" className="py-2 pr-3">Conditions</th>
                  <th scope="col" className="py-2 pr-3 text-right">Blades</th>
                  <th scope="col" className="py-2 pr-3 text-right">Mean difference</th>
                  <th scope="col" className="py-2 pr-3">95 % paired t interval</th>
                  <th scope="col" className="py-2 pr-3 text-right">d<sub>z</sub></th>
                  <th scope="col" className="py-2 pr-3">95 % interval of d<sub>z</sub></th>
                  <th scope="col" className="py-2 pr-3 text-right">p (paired t)</th>
                  <th scope="col" className="py-2 pr-3 text-right">Holm p (intervals not adjusted)</th>
                  <th scope="col" className="py-2 pr-3">Wilcoxon signed-rank</th>
                  <th scope="col" className="py-2 pr-3 text-right">Censored</th>
                </tr>
              </thead>
              <tbody>
                {view.withinBlade.map((w) => (
                  <tr key={`${w.a.key}-${w.b.key}`} className="border-b border-rule">
                    <th scope="row" className="py-2 pr-3 font-bold" data-testid="arm-label">{armLabel(w.a)} − {armLabel(w.b)}</th>
                    <td className="py-2 pr-3 text-right">{w.nBlades}</td>
                    <td className="py-2 pr-3 text-right">{fmt(w.meanDifference, 2)}</td>
                    <td className="py-2 pr-3">{fmtInterval(w.pairedInterval, 2)}</td>
                    <td className="py-2 pr-3 text-right">{fmt(w.dz, 2)}</td>
                    <td className="py-2 pr-3">{fmtInterval(w.dzInterval, 2)}</td>
                    <td className="py-2 pr-3 text-right">{fmtP(w.p)}</td>
                    <td className="py-2 pr-3 text-right">{fmtP(w.pHolm)}</td>
                    <td className="py-2 pr-3 text-sm">
                      p {fmtP(w.wilcoxonP)} ({w.wilcoxonMethod})
                      {w.censorWarning ? <span className="mt-1 block font-bold text-graphite-950" data-testid="within-censor-warning">▲ {w.censorWarning}</span> : null}
                    </td>
                    <td className="py-2 pr-3 text-right">{fmtPercent(w.censoredShare)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          <p className="mt-2 text-sm text-graphite-800">{view.holmNote}</p>
        </section>
      ) : null}
    </div>
  );
}
