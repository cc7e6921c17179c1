/**
 * The pollutant library: air-quality standards and guidelines for the pollutants screening usually
 * meets, each value with its source beside it, plus the loss coefficients the literature suggests for
 * some of them. Data only; `standards.ts` chooses from it for a scenario.
 *
 * Sources, stated once (the tags follow ../../../shared/REFERENCES.md):
 * - [read] the value was read in the published source named;
 * - [memory] recalled from the source named and not yet checked against it: each such entry says so in
 *   its `source`, and the report shows it;
 * - "common practice" marks a habit of the trade with no single source.
 *
 * Conventions: limits in ug/m3 (CO's mg/m3 values converted, 1 mg/m3 = 1000 ug/m3); `averaging_h` 1 for
 * hourly means, 24 for calendar-day means, 8 for 8-hour means, 8760 for the annual (period) mean;
 * `allowedExceedances` per calendar year, which sets the percentile a short-term standard is checked
 * by: p = 100 (1 - n / N), N = 8760 / averaging_h (REFERENCES.md, [derived]).
 */
import type { LibraryPollutant, StandardSet } from '../../scenarios/format/types.ts';

/** What kind of value a standard is: a legal limit, a health guideline, or a critical level for vegetation. */
export type StandardKind = 'limit value' | 'guideline' | 'critical level';

/** How the standard's statistic is formed from hourly values. */
export type StandardStatistic =
  /** the mean over the year (or the period of a series) */
  | 'annual mean'
  /** the percentile of hourly or daily means that the allowed exceedances imply */
  | 'percentile of period means'
  /** the highest daily maximum of running 8-hour means (CO) */
  | 'maximum daily 8-hour running mean';

/** One standard of the library. */
export interface LibraryStandard {
  /** the pollutant the limit is written for (NO2 for NOx emissions) */
  assessedPollutant: Exclude<LibraryPollutant, 'NOx'>;
  set: StandardSet;
  /** the name shown in reports and used for result columns, e.g. "NO2 1-hour mean (EU 2008/50/EC)" */
  name: string;
  kind: StandardKind;
  /** [ug/m3] */
  limit_ug_m3: number;
  /** [h] */
  averaging_h: number;
  /** periods a calendar year allowed above the limit */
  allowedExceedances: number;
  statistic: StandardStatistic;
  /** where the value comes from, with [read] or [memory] */
  source: string;
}

/** The name of each set as a reader knows it. */
export const STANDARD_SET_TITLES: Readonly<Record<StandardSet, string>> = {
  'eu-2008-50-ec': 'EU Directive 2008/50/EC',
  'eu-2024-2881': 'Directive (EU) 2024/2881, values for 2030',
  'who-2021': 'WHO global air quality guidelines 2021',
  'unece-2007': 'UNECE critical levels for vegetation (2007)',
};

const EU2008_READ = 'EU Directive 2008/50/EC, Annex XI [read, via REFERENCES.md]';
const EU2008_MEMORY = 'EU Directive 2008/50/EC, Annex XI [memory: REFERENCES.md, not yet checked against the Directive]';
const EU2024_READ = 'Directive (EU) 2024/2881, Annex I, for 2030 [read, via REFERENCES.md]';
const EU2024_MEMORY = 'Directive (EU) 2024/2881, Annex I, for 2030 [memory: REFERENCES.md; check against Annex I]';
const WHO_READ = 'WHO global air quality guidelines 2021 [read, via REFERENCES.md]';
const WHO_MEMORY = 'WHO global air quality guidelines 2021 [memory: REFERENCES.md]';
/**
 * WHO 2021 states its short-term guideline levels as the 99th percentile of the year's daily values,
 * that is 3 to 4 days a year above them [memory]: plumeplan takes 3 allowed days (99.18th percentile
 * of 365 days, the stricter reading).
 */
const WHO_SHORT_TERM_EXCEEDANCES = 3;
const WHO_SHORT_TERM_NOTE = '; short-term levels as the 99th percentile of daily means, 3 days a year [memory]';

/** mg/m3 to ug/m3 (exact). */
const MG = 1000;

/**
 * Every standard in the library. Order: by pollutant, then set, then averaging period.
 */
export const LIBRARY_STANDARDS: readonly LibraryStandard[] = [
  // NO2
  { assessedPollutant: 'NO2', set: 'eu-2008-50-ec', name: 'NO2 1-hour mean (EU 2008/50/EC)', kind: 'limit value', limit_ug_m3: 200, averaging_h: 1, allowedExceedances: 18, statistic: 'percentile of period means', source: EU2008_READ },
  { assessedPollutant: 'NO2', set: 'eu-2008-50-ec', name: 'NO2 annual mean (EU 2008/50/EC)', kind: 'limit value', limit_ug_m3: 40, averaging_h: 8760, allowedExceedances: 0, statistic: 'annual mean', source: EU2008_READ },
  { assessedPollutant: 'NO2', set: 'eu-2024-2881', name: 'NO2 1-hour mean (EU 2024/2881, 2030)', kind: 'limit value', limit_ug_m3: 200, averaging_h: 1, allowedExceedances: 3, statistic: 'percentile of period means', source: EU2024_MEMORY },
  { assessedPollutant: 'NO2', set: 'eu-2024-2881', name: 'NO2 24-hour mean (EU 2024/2881, 2030)', kind: 'limit value', limit_ug_m3: 50, averaging_h: 24, allowedExceedances: 18, statistic: 'percentile of period means', source: `${EU2024_READ} (limit); allowed exceedances [memory]` },
  { assessedPollutant: 'NO2', set: 'eu-2024-2881', name: 'NO2 annual mean (EU 2024/2881, 2030)', kind: 'limit value', limit_ug_m3: 20, averaging_h: 8760, allowedExceedances: 0, statistic: 'annual mean', source: EU2024_READ },
  { assessedPollutant: 'NO2', set: 'who-2021', name: 'NO2 24-hour mean (WHO 2021)', kind: 'guideline', limit_ug_m3: 25, averaging_h: 24, allowedExceedances: WHO_SHORT_TERM_EXCEEDANCES, statistic: 'percentile of period means', source: WHO_READ + WHO_SHORT_TERM_NOTE },
  { assessedPollutant: 'NO2', set: 'who-2021', name: 'NO2 annual mean (WHO 2021)', kind: 'guideline', limit_ug_m3: 10, averaging_h: 8760, allowedExceedances: 0, statistic: 'annual mean', source: WHO_READ },
  // PM10
  { assessedPollutant: 'PM10', set: 'eu-2008-50-ec', name: 'PM10 24-hour mean (EU 2008/50/EC)', kind: 'limit value', limit_ug_m3: 50, averaging_h: 24, allowedExceedances: 35, statistic: 'percentile of period means', source: EU2008_READ },
  { assessedPollutant: 'PM10', set: 'eu-2008-50-ec', name: 'PM10 annual mean (EU 2008/50/EC)', kind: 'limit value', limit_ug_m3: 40, averaging_h: 8760, allowedExceedances: 0, statistic: 'annual mean', source: EU2008_READ },
  { assessedPollutant: 'PM10', set: 'eu-2024-2881', name: 'PM10 24-hour mean (EU 2024/2881, 2030)', kind: 'limit value', limit_ug_m3: 45, averaging_h: 24, allowedExceedances: 18, statistic: 'percentile of period means', source: `${EU2024_READ} (limit); allowed exceedances [memory]` },
  { assessedPollutant: 'PM10', set: 'eu-2024-2881', name: 'PM10 annual mean (EU 2024/2881, 2030)', kind: 'limit value', limit_ug_m3: 20, averaging_h: 8760, allowedExceedances: 0, statistic: 'annual mean', source: EU2024_READ },
  { assessedPollutant: 'PM10', set: 'who-2021', name: 'PM10 24-hour mean (WHO 2021)', kind: 'guideline', limit_ug_m3: 45, averaging_h: 24, allowedExceedances: WHO_SHORT_TERM_EXCEEDANCES, statistic: 'percentile of period means', source: WHO_READ + WHO_SHORT_TERM_NOTE },
  { assessedPollutant: 'PM10', set: 'who-2021', name: 'PM10 annual mean (WHO 2021)', kind: 'guideline', limit_ug_m3: 15, averaging_h: 8760, allowedExceedances: 0, statistic: 'annual mean', source: WHO_READ },
  // PM2.5
  { assessedPollutant: 'PM2.5', set: 'eu-2008-50-ec', name: 'PM2.5 annual mean (EU 2008/50/EC)', kind: 'limit value', limit_ug_m3: 25, averaging_h: 8760, allowedExceedances: 0, statistic: 'annual mean', source: EU2008_MEMORY },
  { assessedPollutant: 'PM2.5', set: 'eu-2024-2881', name: 'PM2.5 24-hour mean (EU 2024/2881, 2030)', kind: 'limit value', limit_ug_m3: 25, averaging_h: 24, allowedExceedances: 18, statistic: 'percentile of period means', source: `${EU2024_READ} (limit); allowed exceedances [memory]` },
  { assessedPollutant: 'PM2.5', set: 'eu-2024-2881', name: 'PM2.5 annual mean (EU 2024/2881, 2030)', kind: 'limit value', limit_ug_m3: 10, averaging_h: 8760, allowedExceedances: 0, statistic: 'annual mean', source: EU2024_READ },
  { assessedPollutant: 'PM2.5', set: 'who-2021', name: 'PM2.5 24-hour mean (WHO 2021)', kind: 'guideline', limit_ug_m3: 15, averaging_h: 24, allowedExceedances: WHO_SHORT_TERM_EXCEEDANCES, statistic: 'percentile of period means', source: WHO_READ + WHO_SHORT_TERM_NOTE },
  { assessedPollutant: 'PM2.5', set: 'who-2021', name: 'PM2.5 annual mean (WHO 2021)', kind: 'guideline', limit_ug_m3: 5, averaging_h: 8760, allowedExceedances: 0, statistic: 'annual mean', source: WHO_READ },
  // SO2
  { assessedPollutant: 'SO2', set: 'eu-2008-50-ec', name: 'SO2 1-hour mean (EU 2008/50/EC)', kind: 'limit value', limit_ug_m3: 350, averaging_h: 1, allowedExceedances: 24, statistic: 'percentile of period means', source: EU2008_READ },
  { assessedPollutant: 'SO2', set: 'eu-2008-50-ec', name: 'SO2 24-hour mean (EU 2008/50/EC)', kind: 'limit value', limit_ug_m3: 125, averaging_h: 24, allowedExceedances: 3, statistic: 'percentile of period means', source: EU2008_READ },
  { assessedPollutant: 'SO2', set: 'eu-2024-2881', name: 'SO2 1-hour mean (EU 2024/2881, 2030)', kind: 'limit value', limit_ug_m3: 350, averaging_h: 1, allowedExceedances: 3, statistic: 'percentile of period means', source: EU2024_MEMORY },
  { assessedPollutant: 'SO2', set: 'eu-2024-2881', name: 'SO2 24-hour mean (EU 2024/2881, 2030)', kind: 'limit value', limit_ug_m3: 50, averaging_h: 24, allowedExceedances: 18, statistic: 'percentile of period means', source: EU2024_MEMORY },
  { assessedPollutant: 'SO2', set: 'who-2021', name: 'SO2 24-hour mean (WHO 2021)', kind: 'guideline', limit_ug_m3: 40, averaging_h: 24, allowedExceedances: WHO_SHORT_TERM_EXCEEDANCES, statistic: 'percentile of period means', source: WHO_MEMORY + WHO_SHORT_TERM_NOTE },
  // CO
  { assessedPollutant: 'CO', set: 'eu-2008-50-ec', name: 'CO maximum daily 8-hour mean (EU 2008/50/EC)', kind: 'limit value', limit_ug_m3: 10 * MG, averaging_h: 8, allowedExceedances: 0, statistic: 'maximum daily 8-hour running mean', source: EU2008_MEMORY },
  { assessedPollutant: 'CO', set: 'eu-2024-2881', name: 'CO 24-hour mean (EU 2024/2881, 2030)', kind: 'limit value', limit_ug_m3: 4 * MG, averaging_h: 24, allowedExceedances: 18, statistic: 'percentile of period means', source: EU2024_MEMORY },
  { assessedPollutant: 'CO', set: 'who-2021', name: 'CO 24-hour mean (WHO 2021)', kind: 'guideline', limit_ug_m3: 4 * MG, averaging_h: 24, allowedExceedances: WHO_SHORT_TERM_EXCEEDANCES, statistic: 'percentile of period means', source: WHO_MEMORY + WHO_SHORT_TERM_NOTE },
  // benzene
  { assessedPollutant: 'benzene', set: 'eu-2008-50-ec', name: 'benzene annual mean (EU 2008/50/EC)', kind: 'limit value', limit_ug_m3: 5, averaging_h: 8760, allowedExceedances: 0, statistic: 'annual mean', source: EU2008_MEMORY },
  { assessedPollutant: 'benzene', set: 'eu-2024-2881', name: 'benzene annual mean (EU 2024/2881, 2030)', kind: 'limit value', limit_ug_m3: 3.4, averaging_h: 8760, allowedExceedances: 0, statistic: 'annual mean', source: EU2024_MEMORY },
  // NH3: critical levels protect vegetation, not health
  { assessedPollutant: 'NH3', set: 'unece-2007', name: 'NH3 annual mean, lichens and mosses (UNECE 2007)', kind: 'critical level', limit_ug_m3: 1, averaging_h: 8760, allowedExceedances: 0, statistic: 'annual mean', source: 'UNECE critical levels for ammonia, 2007 [memory: REFERENCES.md]' },
  { assessedPollutant: 'NH3', set: 'unece-2007', name: 'NH3 annual mean, higher plants (UNECE 2007)', kind: 'critical level', limit_ug_m3: 3, averaging_h: 8760, allowedExceedances: 0, statistic: 'annual mean', source: 'UNECE critical levels for ammonia, 2007 [memory: REFERENCES.md]' },
];

/** Loss coefficients the literature suggests for a pollutant: offered to the user, never applied unasked. */
export interface SuggestedLosses {
  /** washout Lambda = a R^b, R in mm/h */
  washout?: { a_per_s: number; b: number; source: string };
  /** dry deposition velocity [m/s] */
  depositionVelocity_m_s?: { value: number; source: string };
}

/** One pollutant of the library. */
export interface LibraryPollutantEntry {
  name: LibraryPollutant;
  /** what it is, in a few words */
  description: string;
  /** the pollutant its standards are written for (NOx is assessed as NO2) */
  assessedAs: Exclude<LibraryPollutant, 'NOx'>;
  suggestedLosses: SuggestedLosses;
}

const VDI_WASHOUT = 'VDI 3782 Part 5 (2006) [memory: REFERENCES.md]';
const TA_LUFT_DEPOSITION = 'TA Luft 2002, annex 3, table 13 [read, via REFERENCES.md]';

/** The pollutants of the library. */
export const LIBRARY_POLLUTANT_ENTRIES: Readonly<Record<LibraryPollutant, LibraryPollutantEntry>> = {
  NOx: { name: 'NOx', description: 'oxides of nitrogen as emitted (NO + NO2), assessed as NO2', assessedAs: 'NO2', suggestedLosses: {} },
  NO2: { name: 'NO2', description: 'nitrogen dioxide', assessedAs: 'NO2', suggestedLosses: {} },
  PM10: {
    name: 'PM10',
    description: 'particles below 10 um',
    assessedAs: 'PM10',
    suggestedLosses: {
      washout: { a_per_s: 1.5e-4, b: 0.8, source: `${VDI_WASHOUT}, particles 2.5-10 um` },
      depositionVelocity_m_s: { value: 0.01, source: `${TA_LUFT_DEPOSITION}, particles 2.5-10 um` },
    },
  },
  'PM2.5': {
    name: 'PM2.5',
    description: 'particles below 2.5 um',
    assessedAs: 'PM2.5',
    suggestedLosses: {
      washout: { a_per_s: 0.3e-4, b: 0.8, source: `${VDI_WASHOUT}, particles below 2.5 um` },
      depositionVelocity_m_s: { value: 0.001, source: `${TA_LUFT_DEPOSITION}, particles below 2.5 um` },
    },
  },
  SO2: {
    name: 'SO2',
    description: 'sulphur dioxide',
    assessedAs: 'SO2',
    suggestedLosses: { washout: { a_per_s: 2e-5, b: 1.0, source: `${VDI_WASHOUT}, SO2` } },
  },
  CO: { name: 'CO', description: 'carbon monoxide', assessedAs: 'CO', suggestedLosses: {} },
  benzene: { name: 'benzene', description: 'benzene', assessedAs: 'benzene', suggestedLosses: {} },
  NH3: {
    name: 'NH3',
    description: 'ammonia (critical levels for vegetation)',
    assessedAs: 'NH3',
    suggestedLosses: { washout: { a_per_s: 1.2e-4, b: 0.6, source: `${VDI_WASHOUT}, NH3` } },
  },
};

/**
 * The library's standards for a pollutant, from the sets asked for.
 *
 * @param pollutant a library pollutant; NOx gives NO2's standards
 * @param sets the sets to take standards from; default every set
 * @returns the standards, in library order
 * @example libraryStandardsFor('PM2.5', ['who-2021']) // the two WHO 2021 PM2.5 guidelines
 */
export function libraryStandardsFor(pollutant: LibraryPollutant, sets?: readonly StandardSet[]): LibraryStandard[] {
  const assessedAs = LIBRARY_POLLUTANT_ENTRIES[pollutant].assessedAs;
  return LIBRARY_STANDARDS.filter((standard) => standard.assessedPollutant === assessedAs && (sets === undefined || sets.includes(standard.set)));
}
