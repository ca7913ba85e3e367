/** Number formatting for results: tabular, fixed digits, a dash for missing values. */
export const fmt = (v: number | null | undefined, digits = 1) => (v === null || v === undefined || !Number.isFinite(v) ? "—" : v.toFixed(digits));
export const fmtInterval = (i: { lower: number; upper: number } | null | undefined, digits = 1) => (i ? `${fmt(i.lower, digits)} to ${fmt(i.upper, digits)}` : "—");
/** p-values never stand alone, and very small ones are written as a bound. */
export const fmtP = (p: number | null | undefined) => (p === null || p === undefined ? "—" : p < 0.0001 ? "< 0.0001" : p.toFixed(4));
export const fmtPercent = (share: number) => `${Math.round(share * 1000) / 10} %`;
export const armLabel = (a: { key: string; name: string | null }) => (a.name ? `${a.key} · ${a.name}` : a.key);
