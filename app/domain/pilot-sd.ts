/**
 * The pooled standard deviation of several groups, the SD a finished parallel study
 * offers for planning the next one: sqrt(sum (n_i - 1) s_i^2 / sum (n_i - 1)).
 * Reference: Cohen (1988), Statistical Power Analysis for the Behavioral Sciences, eq. 2.3.2.
 * @param groups each group's n (blades) and SD; groups with n < 2 carry no information and are skipped
 * @returns the pooled SD and the number of blades it rests on, or null when no group has n >= 2
 * @throws Error on a negative or non-finite SD
 */
export function pooledSd(groups: readonly { n: number; sd: number }[]): { sd: number; blades: number } | null {
  let num = 0;
  let den = 0;
  let blades = 0;
  for (const g of groups) {
    if (!Number.isFinite(g.sd) || g.sd < 0) throw new Error(`pooledSd: an SD must be a finite number of at least 0, got ${g.sd}`);
    if (g.n < 2) continue;
    num += (g.n - 1) * g.sd * g.sd;
    den += g.n - 1;
    blades += g.n;
  }
  return den > 0 ? { sd: Math.sqrt(num / den), blades } : null;
}

/** A finished parallel study as the planner sees it: its primary outcome and each arm's blade-mean SD. */
export interface PilotStudy {
  studyName: string;
  protocolName: string;
  protocolVersion: number;
  /** Primary outcome key (e.g. "cuts_to_threshold") and its label and unit. */
  outcome: { key: string; label: string; unit: string };
  replicatesPerBlade: number;
  arms: readonly { nBlades: number; sd: number | null; nRuns: number; nCensoredRuns: number }[];
}

/** The SD one study offers the planner, with what it rests on and when not to trust it. */
export interface PilotSdOffer {
  sd: number;
  blades: number;
  runs: number;
  /** Share of the runs censored at the cap (0..1). */
  censoredShare: number;
  studyName: string;
  protocolName: string;
  protocolVersion: number;
  outcome: { key: string; label: string; unit: string };
  replicatesPerBlade: number;
  /** Set when censoring squeezed the spread, so the SD is too small to plan with as it is. */
  censoringWarning: string | null;
}

/**
 * The pilot SDs to offer for one outcome unit: only studies whose primary outcome is in
 * that unit (an SD of a card study's millimetres is never offered as grams-force), and of
 * those the latest study for each primary outcome (studies in order, latest first). The
 * SD is pooledSd() over the arms' blade means. Censored runs enter at the cap, which
 * squeezes the spread, so any censoring gives a warning that the SD is too small.
 * @param studies finished parallel studies, latest first
 * @param unit the unit the planner plans in, e.g. "cuts", "gf", "gf per cut", "mm"
 * @throws Error on a negative or non-finite SD, or run counts that do not add up
 */
export function pilotSdOffers(studies: readonly PilotStudy[], unit: string): PilotSdOffer[] {
  const offers: PilotSdOffer[] = [];
  const seen = new Set<string>();
  for (const s of studies) {
    if (s.outcome.unit !== unit || seen.has(s.outcome.key)) continue;
    const withSd = s.arms.filter((a) => a.sd !== null).map((a) => ({ n: a.nBlades, sd: a.sd! }));
    const pooled = pooledSd(withSd);
    if (!pooled || !(pooled.sd > 0)) continue;
    const runs = s.arms.reduce((t, a) => t + a.nRuns, 0);
    const censored = s.arms.reduce((t, a) => t + a.nCensoredRuns, 0);
    if (censored > runs || censored < 0) throw new Error(`pilotSdOffers: ${s.studyName} counts ${censored} censored runs of ${runs}`);
    const censoredShare = runs > 0 ? censored / runs : 0;
    const pct = `${Math.round(censoredShare * 1000) / 10} %`;
    seen.add(s.outcome.key);
    offers.push({
      sd: pooled.sd, blades: pooled.blades, runs, censoredShare,
      studyName: s.studyName, protocolName: s.protocolName, protocolVersion: s.protocolVersion, outcome: s.outcome, replicatesPerBlade: s.replicatesPerBlade,
      censoringWarning: censored > 0
        ? `${censored} of ${runs} runs (${pct}) were censored at the cap and enter at the cap: that squeezes the spread, so this SD is too small. Plan with a larger SD, or a longer cap.`
        : null,
    });
  }
  return offers;
}
