/**
 * A process contribution (PC) as a percentage of a standard and the first-stage insignificance screen
 * of permit guidance: insignificant when PC < 1 % of a long-term standard or < 10 % of a short-term one
 * (../../shared/REFERENCES.md, "Screening of a process contribution": the steps read, the thresholds from
 * memory; common practice, never a legal decision). Interim: the assessment part (solver/assessment/,
 * issue 10) will own verdicts; this file stays as small as the siting ranking needs until then.
 */
import type { AirQualityStandard } from '../../scenarios/format/types.ts';

/** Averaging period from which a standard counts as long-term [h] (a year: the period mean). */
export const LONG_TERM_AVERAGING_h = 8760;

/** First-stage thresholds, % of the standard (common practice in permit guidance, from memory). */
export const INSIGNIFICANT_PERCENT = Object.freeze({ longTerm: 1, shortTerm: 10 });

export type ScreeningVerdict = 'insignificant' | 'not insignificant: assess further';

export interface ScreenedPc {
  /** PC as % of the standard's limit */
  percentOfStandard: number;
  /** the threshold applied, % of the standard */
  threshold_percent: number;
  verdict: ScreeningVerdict;
}

/** Whether a standard is long-term (a period mean of a year or more). */
export function isLongTerm(standard: AirQualityStandard): boolean {
  return standard.averaging_h >= LONG_TERM_AVERAGING_h;
}

/**
 * Screen a PC [ug/m3] against a standard.
 *
 * @example screenPc(3, { name: 'NO2 1-hour mean', limit_ug_m3: 200, averaging_h: 1, allowedExceedances: 18 })
 *   // { percentOfStandard: 1.5, threshold_percent: 10, verdict: 'insignificant' }
 */
export function screenPc(pc_ug_m3: number, standard: AirQualityStandard): ScreenedPc {
  if (!(standard.limit_ug_m3 > 0)) throw new RangeError(`standard ${standard.name}: limit_ug_m3 is ${standard.limit_ug_m3}; allowed: > 0`);
  const percentOfStandard = (100 * pc_ug_m3) / standard.limit_ug_m3;
  const threshold_percent = isLongTerm(standard) ? INSIGNIFICANT_PERCENT.longTerm : INSIGNIFICANT_PERCENT.shortTerm;
  return { percentOfStandard, threshold_percent, verdict: percentOfStandard < threshold_percent ? 'insignificant' : 'not insignificant: assess further' };
}

/**
 * The standard a siting run compares with: the one named, or else the one whose statistic the run gives
 * (steady weather: an hourly PC, so the shortest averaging period; a wind rose or an hourly series: a
 * mean, so a long-term standard). Null when the scenario has no standards.
 *
 * @throws RangeError when the named standard is not among the scenario's
 */
export function chooseStandard(standards: readonly AirQualityStandard[], weatherKind: 'steady' | 'windRose' | 'hourly', name?: string): AirQualityStandard | null {
  if (name !== undefined) {
    const named = standards.find((standard) => standard.name === name);
    if (named === undefined) {
      throw new RangeError(`standard "${name}" is not in assessment.standards; allowed: ${standards.map((standard) => `"${standard.name}"`).join(', ') || 'none (the scenario has no standards)'}`);
    }
    return named;
  }
  if (standards.length === 0) return null;
  if (weatherKind !== 'steady') return standards.find(isLongTerm) ?? null;
  return [...standards].sort((a, b) => a.averaging_h - b.averaging_h)[0];
}
