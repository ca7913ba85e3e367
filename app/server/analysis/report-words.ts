import { cardValuesSourceInWords, type ProtocolContent } from "~/domain/protocol.ts";
import { workingSharpnessRuleInWords } from "~/domain/outcomes.ts";

/** The protocol's stop rule in one sentence, for the report. */
export function describeStopRule(content: ProtocolContent): string {
  const f = content.edgeForce;
  if (content.measurementKind === "card_depth" && content.card) {
    return `Card depth per stroke over ${content.card.strokeCount} strokes; initial cutting performance over the first ${content.card.initialStrokes} strokes (pass mark ${content.card.initialPassMm} mm) and total card cut (pass mark ${content.card.totalPassMm} mm). ${cardValuesSourceInWords(content.card.valuesSource)}`;
  }
  if (!f) return "No stop rule recorded.";
  return `Baseline, then readings at ${f.positions.join(", ")} every ${f.checkEveryCuts} cut${f.checkEveryCuts === 1 ? "" : "s"}, aggregated by the ${f.aggregation}; the run ends when a check reaches ${f.thresholdGf} gf${f.confirmAtFreshSpot ? " and a confirmation reading at a fresh spot also does" : ""}, and is censored at ${f.capCuts} cuts. ${workingSharpnessRuleInWords(f.workingHorizonCuts)}`;
}

export { outcomeLabel } from "~/domain/study-analysis.ts";
