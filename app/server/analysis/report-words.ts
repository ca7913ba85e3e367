import { cardValuesSourceInWords, type ProtocolContent } from "~/domain/protocol.ts";
import { workingSharpnessRuleInWords } from "~/domain/outcomes.ts";
import { STATE_LOOKS } from "~/lib/states.ts";

/** The protocol's stop rule in one sentence, for the report. */
export function describeStopRule(content: ProtocolContent): string {
  const f = content.edgeForce;
  if (content.measurementKind === "card_depth" && content.card) {
    return `Card depth per stroke over ${content.card.strokeCount} strokes; initial cutting performance over the first ${content.card.initialStrokes} strokes (pass mark ${content.card.initialPassMm} mm) and total card cut (pass mark ${content.card.totalPassMm} mm). ${cardValuesSourceInWords(content.card.valuesSource)}`;
  }
  if (!f) return "No stop rule recorded.";
  return `Baseline, then readings at ${f.positions.join(", ")} every ${f.checkEveryCuts} cut${f.checkEveryCuts === 1 ? "" : "s"}, aggregated by the ${aggregationLabel(f.aggregation)}; the run ends when a check reaches ${f.thresholdGf} gf${f.confirmAtFreshSpot ? " and a confirmation reading at a fresh spot also does" : ""}, and is censored at ${f.capCuts} cuts. ${workingSharpnessRuleInWords(f.workingHorizonCuts)}`;
}

export { outcomeLabel } from "~/domain/study-analysis.ts";

/** Audit actions in words; an action not listed reads as its words, never as its raw id. */
const AUDIT_ACTIONS: Record<string, string> = {
  "study.created": "Study created",
  "study.randomized": "Schedule rolled",
  "study.rerolled": "Schedule rolled again",
  "study.started": "Study started",
  "study.closed": "Study closed",
  "study.unblinded": "Study unblinded",
  "run.deviation": "Deviation recorded",
  "run.reassigned": "Run reassigned",
  "run.withdrawn": "Run withdrawn",
  "run.withdrawn_after_end": "Ended run withdrawn",
  "reading.corrected": "Reading corrected",
  "blade.created": "Blade added",
  "blade.imported": "Blades imported",
  "blade.updated": "Blade updated",
  "blade.custody": "Blade custody changed",
  "protocol.created": "Protocol created",
  "protocol.draft_started": "Protocol draft started",
  "protocol.published": "Protocol published",
  "lab.time_zone_changed": "Lab time zone changed",
};

/** Words for any raw id: "run.withdrawn_after_end" reads "Run withdrawn after end". */
function idInWords(id: string): string {
  const words = id.replace(/[._]+/g, " ").trim();
  return words.charAt(0).toUpperCase() + words.slice(1);
}

export function auditActionLabel(action: string): string {
  return AUDIT_ACTIONS[action] ?? idInWords(action);
}

const EVENT_KINDS: Record<string, string> = {
  deviation: "deviation",
  reassigned: "reassigned to another tester",
  withdrawn: "withdrawn",
  failed_sharpening: "failed sharpening",
};

/** A run event's kind in words, for the deviations list. */
export function eventKindLabel(kind: string): string {
  return EVENT_KINDS[kind] ?? idInWords(kind).toLowerCase();
}

const AGGREGATIONS: Record<string, string> = { median: "median", mean: "mean", max: "maximum", min: "minimum" };

/** How a check's positions are combined, in words. */
export function aggregationLabel(aggregation: string): string {
  return AGGREGATIONS[aggregation] ?? idInWords(aggregation).toLowerCase();
}

/** A study's state in words: the app's one word per state. */
export function studyStateLabel(state: string): string {
  return STATE_LOOKS.study[state]?.word ?? idInWords(state);
}
