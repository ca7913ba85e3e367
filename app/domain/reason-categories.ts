/**
 * The fixed list of reasons a run is withdrawn, reassigned or deviates from the schedule.
 * Blinded readers (analysts, and everything derived before unblinding) see only the
 * category; the free-text note beside it can name a steel or a condition, so it stays
 * with owners and leads until the study is unblinded.
 */
export const REASON_CATEGORIES = {
  blade_damaged: "Blade damaged",
  medium_fault: "Test medium fault",
  instrument_fault: "Instrument fault",
  tester_unavailable: "Tester unavailable",
  protocol_deviation: "Protocol deviation",
  other: "Other",
} as const;

export type ReasonCategory = keyof typeof REASON_CATEGORIES;
export const REASON_CATEGORY_KEYS = Object.keys(REASON_CATEGORIES) as [ReasonCategory, ...ReasonCategory[]];

export function reasonCategoryLabel(category: string | null | undefined): string {
  return category && category in REASON_CATEGORIES ? REASON_CATEGORIES[category as ReasonCategory] : "Not categorised";
}
