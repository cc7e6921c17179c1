/**
 * Statistics of a weather series at receptors and on the ground: means, maxima and each standard's
 * statistic (percentile of period means, exceedance counts), from fields stored either as references
 * into distinct solves or as one array per hour.
 */
import type { Assessment, AirQualityStandard } from '../../scenarios/format/types.ts';
import { averagingPlan, standardColumnKey, standardExceedanceKey, standardFigures, type AveragingPlan } from '../diagnostics/statistics.ts';
import { sitePeak, type SitePeak } from '../grid/siteBoundary.ts';
import type { ReceptorColumn } from './types.ts';
import type { SeriesBaseInput, SeriesFields } from './seriesSolves.ts';
import { isComputable, pcFactorOf } from '../assessment/standards.ts';

/** Access to hour h's value at receptor r and column c, whichever way the fields are stored. */
export interface HourlyValues {
  hours: number;
  receptorValue(h: number, r: number): number;
  groundValue(h: number, column: number): number;
}

export function hourlyValuesFromFields(fields: SeriesFields): HourlyValues {
  const { solves, solveOfHour, scaleOfHour } = fields;
  const grounds = solves.map((s) => s.ground_ug_m3);
  const receptors = solves.map((s) => s.receptors_ug_m3);
  return {
    hours: solveOfHour.length,
    receptorValue: (h, r) => receptors[solveOfHour[h]][r] * scaleOfHour[h],
    groundValue: (h, column) => grounds[solveOfHour[h]][column] * scaleOfHour[h],
  };
}

/** Hour-by-hour fields stored one Float32Array per hour (continuous runs). */
export function hourlyValuesFromArrays(receptors: Float64Array[], grounds: Float32Array[]): HourlyValues {
  return {
    hours: receptors.length,
    receptorValue: (h, r) => receptors[h][r],
    groundValue: (h, column) => grounds[h][column],
  };
}

/** One standard's result at the receptors and on the ground grid. */
interface StandardResult {
  standard: AirQualityStandard;
  plan: AveragingPlan;
  receptorValues: Float64Array;
  receptorExceedances: Float64Array;
  groundValues: Float64Array;
}

/** Statistics of a series of fields at the receptors and on the ground grid. */
export interface SeriesStatistics {
  receptorMean: Float64Array;
  receptorMax: Float64Array;
  groundMean: Float64Array;
  groundMax: Float64Array;
  standards: StandardResult[];
}

/**
 * Mean, maximum and each standard's statistic at every receptor and ground column. A standard's figures
 * are of the assessed pollutant: the hourly PC times the standard's PC factor (the NOx to NO2 ratio of
 * ../assessment/standards.ts, 1 for a plain standard). Standards whose statistic plumeplan cannot form
 * (see isComputable) are left out here and reported by the assessment.
 */
export function seriesStatistics(
  values: HourlyValues,
  receptorCount: number,
  columns: number,
  hourStarts_ms: Float64Array,
  offsetMinutes: number,
  assessment: Assessment | undefined,
): SeriesStatistics {
  const hours = values.hours;
  const standards = (assessment?.standards ?? []).filter(isComputable).map((standard) => ({
    standard,
    plan: averagingPlan(hourStarts_ms, offsetMinutes, standard.averaging_h, standard.runningMean === true),
    factor: pcFactorOf(standard),
  }));
  const background = assessment?.background_ug_m3 ?? 0;
  const series = new Float64Array(hours);
  const scaled = new Float64Array(hours);
  const work = new Float64Array(hours);
  const assessedSeries = (factor: number): Float64Array => {
    if (factor === 1) return series;
    for (let h = 0; h < hours; h++) scaled[h] = factor * series[h];
    return scaled;
  };
  const summarise = (fill: (series: Float64Array) => void) => {
    fill(series);
    let sum = 0;
    let largest = Number.NEGATIVE_INFINITY;
    for (let h = 0; h < hours; h++) {
      sum += series[h];
      if (series[h] > largest) largest = series[h];
    }
    const figures = standards.map(({ standard, plan, factor }) => standardFigures(assessedSeries(factor), plan, standard, background, work));
    return { mean: sum / hours, max: largest, figures };
  };
  const receptorMean = new Float64Array(receptorCount);
  const receptorMax = new Float64Array(receptorCount);
  const results: StandardResult[] = standards.map(({ standard, plan }) => ({
    standard,
    plan,
    receptorValues: new Float64Array(receptorCount),
    receptorExceedances: new Float64Array(receptorCount),
    groundValues: new Float64Array(columns),
  }));
  for (let r = 0; r < receptorCount; r++) {
    const s = summarise((out) => {
      for (let h = 0; h < hours; h++) out[h] = values.receptorValue(h, r);
    });
    receptorMean[r] = s.mean;
    receptorMax[r] = s.max;
    s.figures.forEach((f, i) => {
      results[i].receptorValues[r] = f.value_ug_m3;
      results[i].receptorExceedances[r] = f.exceedances;
    });
  }
  const groundMean = new Float64Array(columns);
  const groundMax = new Float64Array(columns);
  for (let c = 0; c < columns; c++) {
    const s = summarise((out) => {
      for (let h = 0; h < hours; h++) out[h] = values.groundValue(h, c);
    });
    groundMean[c] = s.mean;
    groundMax[c] = s.max;
    s.figures.forEach((f, i) => {
      results[i].groundValues[c] = f.value_ug_m3;
    });
  }
  return { receptorMean, receptorMax, groundMean, groundMax, standards: results };
}

/** The receptor columns of a series: mean, max, then each standard's statistic and exceedance count. */
export function seriesReceptorColumns(
  receptorMean: Float64Array,
  receptorMax: Float64Array,
  standards: { standard: AirQualityStandard; receptorValues: Float64Array; receptorExceedances: Float64Array }[],
): ReceptorColumn[] {
  const columns: ReceptorColumn[] = [
    { key: 'mean_ug_m3', values: receptorMean },
    { key: 'max_ug_m3', values: receptorMax },
  ];
  const used = new Set(columns.map((c) => c.key));
  for (const { standard, receptorValues, receptorExceedances } of standards) {
    for (const [key, values] of [
      [standardColumnKey(standard), receptorValues],
      [standardExceedanceKey(standard), receptorExceedances],
    ] as const) {
      let unique = key;
      for (let n = 2; used.has(unique); n++) unique = `${key}_${n}`;
      used.add(unique);
      columns.push({ key: unique, values });
    }
  }
  return columns;
}

/**
 * Peak of a ground field: value and position of the column centre [m], off the site when the scenario
 * gives a site boundary (the on-site maximum kept beside it, labelled), and where it was looked for.
 */
export function groundPeak(base: SeriesBaseInput, field: ArrayLike<number>): SitePeak {
  return sitePeak(base.grid, field, base.site ?? null);
}

/** The standards' part of summary.json for a series (or a wind rose). */
