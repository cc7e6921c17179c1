/**
 * The standards a scenario is assessed against: the library's for its chosen pollutant (from the sets
 * asked for) and the user's own, each with the factor that turns the run's process contribution (PC)
 * into the assessed pollutant's (NOx emitted, NO2 assessed).
 *
 * NOx to NO2 (common practice in permit guidance, [memory] REFERENCES.md): only part of the NOx a stack
 * emits is NO2 at a receptor. Screening commonly takes 70 % of NOx as NO2 for long-term statistics and
 * 35 % for short-term ones (100 % and 50 % as a worst case). The ratios are configurable
 * (`assessment.noxToNo2`) and every result states which were used. User-defined standards are taken as
 * written for the pollutant the scenario emits (factor 1).
 */
import type {
  AirQualityStandard,
  Assessment,
  LibraryPollutant,
  NoxToNo2,
  ScreeningThresholds,
  StandardSet,
} from '../../scenarios/format/types.ts';
import { HOURS_PER_YEAR } from '../diagnostics/statistics.ts';
import { libraryStandardsFor, STANDARD_SET_TITLES, type StandardKind, type StandardStatistic } from './pollutantLibrary.ts';

/** Default NOx to NO2 ratios: 70 % long-term, 35 % short-term (common practice in permit guidance, [memory] REFERENCES.md). */
export const DEFAULT_NOX_TO_NO2: Readonly<NoxToNo2> = { longTerm: 0.7, shortTerm: 0.35 };

/** Where the default ratios come from, shown beside them in every result. */
export const NOX_TO_NO2_SOURCE =
  'common practice in permit guidance: 70 % of NOx as NO2 for long-term and 35 % for short-term statistics ' +
  '(100 % and 50 % as a worst case) [from memory, REFERENCES.md]';

/**
 * Default thresholds of the two-stage screen (common practice in permit guidance: gov.uk, "Air emissions
 * risk assessment for your environmental permit" [read: the steps; thresholds from memory]).
 */
export const DEFAULT_SCREENING_THRESHOLDS: Readonly<ScreeningThresholds> = { pcLongTerm_pct: 1, pcShortTerm_pct: 10, pecLongTerm_pct: 70 };

/** A standard as assessed in one scenario. */
export interface AssessedStandard extends AirQualityStandard {
  /** "library" or "user" */
  origin: 'library' | 'user';
  /** the library set, for library standards */
  set?: StandardSet;
  /** the set's title, or "user-defined" */
  setTitle: string;
  kind: StandardKind | 'user-defined';
  statistic: StandardStatistic;
  /** where the value comes from */
  source: string;
  /** pollutant the limit is written for (the scenario's pollutant name for user standards) */
  assessedPollutant: string;
  /** long-term (annual or period mean) or short-term */
  term: 'long' | 'short';
  /** assessed PC = pcFactor x the run's PC (the NOx to NO2 ratio, or 1) */
  pcFactor: number;
  /** how pcFactor was chosen, or null when it is 1 */
  conversion: string | null;
  /**
   * null when plumeplan can compute this standard's statistic from an hourly series; otherwise why not
   */
  notComputed: string | null;
}

/** Everything the assessment of a scenario needs, resolved from `scenario.assessment`. */
export interface AssessmentPlan {
  background_ug_m3: number;
  standards: AssessedStandard[];
  thresholds: ScreeningThresholds;
  /** the ratios used when NOx is assessed as NO2, else null */
  noxToNo2: NoxToNo2 | null;
  libraryPollutant: LibraryPollutant | null;
}

/** Whether a standard is long-term: its statistic is the mean over the year (or the series). */
export function isLongTerm(standard: Pick<AirQualityStandard, 'averaging_h'>): boolean {
  return standard.averaging_h >= HOURS_PER_YEAR;
}

/**
 * Resolve a scenario's assessment: library standards for its pollutant and sets, then the user's, each
 * with its PC factor.
 *
 * @param assessment the scenario's `assessment` block
 * @param emittedPollutant `scenario.pollutant.name`, the name user standards are written for
 * @returns the plan; standards in library order, then the user's
 * @throws RangeError naming the field when a user standard takes the name of a library one
 * @example assessmentPlan({ background_ug_m3: 14, standards: [], libraryPollutant: 'NOx', standardSets: ['eu-2008-50-ec'] }, 'NOx')
 */
export function assessmentPlan(assessment: Assessment, emittedPollutant: string): AssessmentPlan {
  const libraryPollutant = assessment.libraryPollutant ?? null;
  const noxToNo2 = libraryPollutant === 'NOx' ? { ...(assessment.noxToNo2 ?? DEFAULT_NOX_TO_NO2) } : null;
  const ratioSource = assessment.noxToNo2 === undefined ? NOX_TO_NO2_SOURCE : 'given in assessment.noxToNo2';
  const standards: AssessedStandard[] = [];
  if (libraryPollutant !== null) {
    for (const entry of libraryStandardsFor(libraryPollutant, assessment.standardSets)) {
      const term = isLongTerm(entry) ? 'long' : 'short';
      const ratio = noxToNo2 === null ? 1 : term === 'long' ? noxToNo2.longTerm : noxToNo2.shortTerm;
      standards.push({
        name: entry.name,
        limit_ug_m3: entry.limit_ug_m3,
        averaging_h: entry.averaging_h,
        allowedExceedances: entry.allowedExceedances,
        origin: 'library',
        set: entry.set,
        setTitle: STANDARD_SET_TITLES[entry.set],
        kind: entry.kind,
        statistic: entry.statistic,
        source: entry.source,
        assessedPollutant: entry.assessedPollutant,
        term,
        pcFactor: ratio,
        conversion: noxToNo2 === null ? null : `NO2 = ${ratio} x NOx (${term}-term ratio; ${ratioSource})`,
        // the CO standard's statistic: each day's largest running 8-hour mean (../diagnostics/statistics.ts)
        ...(entry.statistic === 'maximum daily 8-hour running mean' ? { runningMean: true } : {}),
        notComputed: null,
      });
    }
  }
  const libraryNames = new Set(standards.map((standard) => standard.name));
  assessment.standards.forEach((standard, index) => {
    if (libraryNames.has(standard.name)) {
      throw new RangeError(
        `assessment.standards[${index}].name: ${JSON.stringify(standard.name)} is the name of a library standard; give your own standard another name`,
      );
    }
    standards.push({
      ...standard,
      origin: 'user',
      setTitle: 'user-defined',
      kind: 'user-defined',
      statistic: isLongTerm(standard) ? 'annual mean' : 'percentile of period means',
      source: 'given in the scenario (assessment.standards)',
      assessedPollutant: emittedPollutant,
      term: isLongTerm(standard) ? 'long' : 'short',
      pcFactor: 1,
      conversion: null,
      notComputed: null,
    });
  });
  return {
    background_ug_m3: assessment.background_ug_m3,
    standards,
    thresholds: { ...(assessment.screening ?? DEFAULT_SCREENING_THRESHOLDS) },
    noxToNo2,
    libraryPollutant,
  };
}

/** The PC factor of a standard: pcFactor for assessed standards, 1 for a plain one. */
export function pcFactorOf(standard: AirQualityStandard): number {
  const factor = (standard as Partial<AssessedStandard>).pcFactor;
  return factor === undefined ? 1 : factor;
}

/** Whether a series can compute this standard's statistic. */
export function isComputable(standard: AirQualityStandard): boolean {
  return ((standard as Partial<AssessedStandard>).notComputed ?? null) === null;
}
