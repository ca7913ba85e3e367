/**
 * Hardness: the approximate Vickers equivalent of a Rockwell C reading, and the mean
 * and spread of a blade's readings.
 *
 * Reference: ASTM E140, Standard Hardness Conversion Tables for Metals, Table 1
 * (non-austenitic steels), Rockwell C to Vickers (HV). Conversions are approximate:
 * report the measured scale (HRC, per ASTM E18) and show HV as "approx.".
 */

/**
 * ASTM E140 Table 1 rows, HRC → HV, whole HRC from 20 to 68.
 * Rows marked "confirmed" are given in the project's references
 * (../shared/docs/references.md, ASTM E140); all other rows are from memory and must
 * be checked against the standard's text before they are relied on.
 */
export const ASTM_E140_HRC_TO_HV: readonly (readonly [hrc: number, hv: number])[] = [
  [20, 238], // from memory
  [21, 243], // from memory
  [22, 248], // from memory
  [23, 254], // from memory
  [24, 260], // from memory
  [25, 266], // from memory
  [26, 272], // from memory
  [27, 279], // from memory
  [28, 286], // from memory
  [29, 294], // from memory
  [30, 302], // from memory
  [31, 310], // from memory
  [32, 318], // from memory
  [33, 327], // from memory
  [34, 336], // from memory
  [35, 345], // from memory
  [36, 354], // from memory
  [37, 363], // from memory
  [38, 372], // from memory
  [39, 382], // from memory
  [40, 392], // from memory
  [41, 402], // from memory
  [42, 412], // from memory
  [43, 423], // from memory
  [44, 434], // from memory
  [45, 446], // from memory
  [46, 458], // from memory
  [47, 471], // from memory
  [48, 484], // from memory
  [49, 498], // from memory
  [50, 513], // from memory
  [51, 528], // from memory
  [52, 544], // from memory
  [53, 560], // from memory
  [54, 577], // from memory
  [55, 595], // confirmed
  [56, 613], // from memory
  [57, 633], // confirmed
  [58, 653], // confirmed
  [59, 674], // from memory
  [60, 697], // confirmed
  [61, 720], // from memory
  [62, 746], // confirmed
  [63, 772], // confirmed
  [64, 800], // confirmed
  [65, 832], // confirmed
  [66, 865], // from memory
  [67, 900], // from memory
  [68, 940], // from memory
];

/** The whole-HRC rows of ASTM_E140_HRC_TO_HV given in ../shared/docs/references.md (ASTM E140); the rest are from memory. */
export const ASTM_E140_CONFIRMED_HRC: ReadonlySet<number> = new Set([55, 57, 58, 60, 62, 63, 64, 65]);

/**
 * Whether the HV shown for a Rockwell C value rests only on rows given in the
 * references ("confirmed") or on a row recalled from memory ("from memory"): an
 * interpolated value uses the two whole-HRC rows either side, a whole value its own row.
 * @throws Error as hrcToHv does (non-finite, or outside 20–68 HRC)
 */
export function hvConversionSource(hrc: number): "confirmed" | "from memory" {
  hrcToHv(hrc);
  const rows = Number.isInteger(hrc) ? [hrc] : [Math.floor(hrc), Math.floor(hrc) + 1];
  return rows.every((r) => ASTM_E140_CONFIRMED_HRC.has(r)) ? "confirmed" : "from memory";
}

/** The lowest HRC the conversion table covers. */
export const HRC_TABLE_MIN = 20;
/** The highest HRC the conversion table covers. */
export const HRC_TABLE_MAX = 68;
/** The range a Rockwell C reading of a blade may take (outside it the C scale does not apply). */
export const HRC_READING_MIN = 20;
export const HRC_READING_MAX = 70;

/**
 * The approximate Vickers hardness (HV) of a Rockwell C value, by linear
 * interpolation between the whole-HRC rows of ASTM E140 Table 1.
 *
 * @param hrc a Rockwell C hardness from 20 to 68
 * @returns the approximate HV (not rounded)
 * @throws Error when hrc is not a finite number or lies outside 20–68 HRC
 */
export function hrcToHv(hrc: number): number {
  if (typeof hrc !== "number" || !Number.isFinite(hrc)) {
    throw new Error(`hrcToHv: the hardness must be a finite number, got ${String(hrc)}`);
  }
  if (hrc < HRC_TABLE_MIN || hrc > HRC_TABLE_MAX) {
    throw new Error(
      `hrcToHv: ${hrc} HRC is outside the ASTM E140 conversion table (${HRC_TABLE_MIN}–${HRC_TABLE_MAX} HRC); no Vickers equivalent is given`,
    );
  }
  const i = Math.min(Math.floor(hrc) - HRC_TABLE_MIN, ASTM_E140_HRC_TO_HV.length - 2);
  const [h0, v0] = ASTM_E140_HRC_TO_HV[i];
  const [h1, v1] = ASTM_E140_HRC_TO_HV[i + 1];
  return v0 + ((hrc - h0) * (v1 - v0)) / (h1 - h0);
}

/** The mean and spread of a blade's hardness readings. */
export interface HardnessSummary {
  n: number;
  /** Arithmetic mean, HRC. */
  mean: number;
  /** Sample standard deviation (n - 1 in the denominator), HRC; null for a single reading. */
  sd: number | null;
  min: number;
  max: number;
  /** max - min, HRC. */
  range: number;
}

/**
 * The mean, sample standard deviation (n - 1), minimum, maximum and range of
 * Rockwell C readings.
 *
 * @param readings the readings, HRC, each from 20 to 70
 * @returns the summary
 * @throws Error when there is no reading, or a reading is not a finite number in 20–70 HRC
 */
export function summarizeHardness(readings: readonly number[]): HardnessSummary {
  if (!Array.isArray(readings) || readings.length === 0) throw new Error("summarizeHardness: at least one reading is needed");
  readings.forEach((r, i) => {
    if (typeof r !== "number" || !Number.isFinite(r) || r < HRC_READING_MIN || r > HRC_READING_MAX) {
      throw new Error(
        `summarizeHardness: reading ${i + 1} (${String(r)}) is not a Rockwell C value from ${HRC_READING_MIN} to ${HRC_READING_MAX} HRC`,
      );
    }
  });
  const n = readings.length;
  const mean = readings.reduce((a, b) => a + b, 0) / n;
  const sd = n < 2 ? null : Math.sqrt(readings.reduce((a, r) => a + (r - mean) ** 2, 0) / (n - 1));
  const min = Math.min(...readings);
  const max = Math.max(...readings);
  return { n, mean, sd, min, max, range: max - min };
}
