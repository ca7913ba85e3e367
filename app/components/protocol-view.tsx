// Read-only views of a protocol version: the full record and the state badge.
import { workingSharpnessRuleInWords } from "~/domain/outcomes.ts";
import { MEASUREMENT_KIND_LABELS, stepInWords, stopRuleInWords, type ProtocolContent } from "~/domain/protocol.ts";

/** The state in words and shape, not colour alone. */
export function StateBadge({ state }: { state: "draft" | "published" }) {
  return state === "published" ? (
    <span data-state="published" className="inline-flex items-center gap-1 rounded border-2 border-graphite-800 px-2 py-0.5 text-sm font-bold text-graphite-950">
      <span aria-hidden="true">■</span> Published
    </span>
  ) : (
    <span data-state="draft" className="inline-flex items-center gap-1 rounded border-2 border-dashed border-graphite-400 px-2 py-0.5 text-sm font-bold text-graphite-600">
      <span aria-hidden="true">□</span> Draft
    </span>
  );
}

export function shortHash(hash: string | null) {
  return hash ? `${hash.slice(0, 12)}…` : "—";
}

function Row({ term, children }: { term: string; children: React.ReactNode }) {
  return (
    <div className="grid gap-1 border-b border-rule py-2 md:grid-cols-[16rem_1fr]">
      <dt className="font-bold text-graphite-800">{term}</dt>
      <dd>{children}</dd>
    </div>
  );
}

export function cutMethodInWords(c: ProtocolContent) {
  const m = c.cutMethod;
  const parts = [m.motion === "push" ? "Push cut" : "Slice", `stroke ${m.strokeLengthMm} mm`];
  parts.push(m.loading === "set_load" ? `load ${m.cutLoadN} N` : "by hand in a fixture");
  if (m.machine) parts.push(`by machine at ${m.strokeSpeedMmS} mm/s`);
  return parts.join(", ");
}

export function ProtocolRecord({ content, mediumName }: { content: ProtocolContent; mediumName: string | null }) {
  const f = content.edgeForce;
  const k = content.card;
  return (
    <dl>
      <Row term="Purpose">{content.purpose || <span className="text-graphite-600">Not stated</span>}</Row>
      <Row term="Measurement kind">{MEASUREMENT_KIND_LABELS[content.measurementKind]}</Row>
      <Row term="Cut medium">
        {mediumName ?? <span className="text-graphite-600">No lab medium linked</span>}
        {content.medium.description ? ` — ${content.medium.description}` : ""}
      </Row>
      <Row term="Cut method">{cutMethodInWords(content)}</Row>
      <Row term="Edge length under test">
        <span className="figures">{content.edgeLengthMm}</span> mm
      </Row>
      <Row term="Replicates per blade">
        <span className="figures">{content.replicatesPerBlade}</span>
      </Row>
      {f ? (
        <>
          <Row term="Checks">
            Baseline, then every <span className="figures">{f.checkEveryCuts}</span> cut{f.checkEveryCuts === 1 ? "" : "s"}; {f.aggregation} of the positions
          </Row>
          <Row term="Reading positions">{f.positions.join(" → ")}</Row>
          <Row term="Threshold">
            <strong className="figures text-signal">{f.thresholdGf} gf</strong>
            {f.confirmAtFreshSpot ? ", confirmed by a reading at a fresh spot" : ", no confirmation reading"} (tester maximum{" "}
            <span className="figures">{f.testerMaxGf}</span> gf)
          </Row>
          <Row term="Cap">
            <span className="figures">{f.capCuts}</span> cuts (censored there)
          </Row>
          <Row term="Working-sharpness horizon">
            <span data-testid="working-horizon">
              {f.workingHorizonCuts !== undefined ? (
                <>
                  <span className="figures">{f.workingHorizonCuts}</span> cuts.{" "}
                </>
              ) : null}
              {workingSharpnessRuleInWords(f.workingHorizonCuts)}
            </span>
          </Row>
        </>
      ) : null}
      {k ? (
        <>
          <Row term="Strokes">
            <span className="figures">{k.strokeCount}</span>; initial cutting performance over the first <span className="figures">{k.initialStrokes}</span>
          </Row>
          <Row term="Pass marks">
            initial <span className="figures">{k.initialPassMm}</span> mm, total <span className="figures">{k.totalPassMm}</span> mm{" "}
            {k.valuesSource === "from_memory" ? <em>(from memory: check against the standard)</em> : <em>(checked against the standard)</em>}
          </Row>
        </>
      ) : null}
      <Row term="Stop rule">{stopRuleInWords(content)}</Row>
      <Row term="Sharpening recipe">
        <ol className="list-decimal pl-6">
          {content.sharpening.map((s, i) => (
            <li key={i}>{stepInWords(s)}</li>
          ))}
        </ol>
      </Row>
      <Row term="Safety checklist">
        <ul className="list-disc pl-6">
          {content.safetyChecklist.map((s, i) => (
            <li key={i}>{s}</li>
          ))}
        </ul>
      </Row>
    </dl>
  );
}
