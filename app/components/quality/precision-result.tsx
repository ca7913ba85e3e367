import type { PrecisionAnalysis } from "~/domain/quality/index.ts";

type Study = { id: string; name: string; testers: number; edges: number; repeats: number; seed: string; readings: number; planned: number; finishedAt: string | null; analysis: PrecisionAnalysis | null; problem: string | null };

const f = (x: number | null, d = 1) => (x === null ? "—" : x.toFixed(d));

/** A repeatability study's result: ISO 5725-2 precision figures, variance components with intervals, and the smallest meaningful difference. */
export function PrecisionResults({ studies }: { studies: Study[] }) {
  return (
    <section className="mt-8" data-testid="precision-studies">
      <h2 className="text-2xl font-bold">Repeatability and reproducibility</h2>
      {studies.length === 0 ? <p>No repeatability study on this instrument yet.</p> : null}
      {studies.map((s) => (
        <details key={s.id} className="mt-4 rounded border border-rule p-3" data-testid="precision-study">
          <summary className="cursor-pointer font-bold">{s.name}: {s.testers} testers × {s.edges} edges × {s.repeats} readings (seed {s.seed})</summary>
          {!s.finishedAt ? <p>{s.readings} of {s.planned} readings taken; the analysis is shown when the study is finished.</p> : null}
          {s.problem ? <p className="text-fault">{s.problem}</p> : null}
          {s.analysis ? (
            <div data-testid="precision-result">
              <p className="figures mt-2">
                Repeatability SD s<sub>r</sub> = <strong data-testid="sr">{f(s.analysis.repeatabilitySD)} gf</strong>; reproducibility SD s<sub>R</sub> = <strong data-testid="sR">{f(s.analysis.reproducibilitySD)} gf</strong>; measurement share of the total variance {(100 * s.analysis.measurementShare).toFixed(0)} %; n = {s.analysis.n} readings of {s.analysis.edges} edges.
              </p>
              <p className="mt-2">{s.analysis.statement}</p>
              <table className="mt-2 w-full border-collapse text-left">
                <caption className="text-left">Variance components (gf²) with {Math.round(s.analysis.level * 100)} % intervals</caption>
                <thead><tr className="border-b-2 border-graphite-800"><th scope="col">Component</th><th scope="col">Variance</th><th scope="col">SD (gf)</th><th scope="col">Interval of the variance</th><th scope="col">df</th></tr></thead>
                <tbody>
                  {s.analysis.components.map((c) => (
                    <tr key={c.name} className="border-b border-rule">
                      <td>{c.name}{c.truncated ? " (negative estimate, shown as 0)" : ""}</td>
                      <td className="figures">{f(c.variance, 2)}</td>
                      <td className="figures">{f(c.sd, 2)}</td>
                      <td className="figures">{c.lower === null ? "—" : `${f(c.lower, 2)} to ${c.upper === null ? "—" : f(c.upper, 2)}`}</td>
                      <td className="figures">{c.df === null ? "—" : f(c.df, 1)}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
              <p className="mt-2 text-sm">
                Method: {s.analysis.method}. Repeatability and reproducibility as in ISO 5725-2:2019 with the tester in the place of the laboratory; limits 2.8 s from ISO 5725-6; components from the expected mean squares (Montgomery, Introduction to Statistical Quality Control, section 8.7); intervals exact chi-square for s<sub>r</sub>², Satterthwaite (1946) otherwise (approximate). See docs/statistics.md.
              </p>
            </div>
          ) : null}
        </details>
      ))}
    </section>
  );
}
