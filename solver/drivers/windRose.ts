/**
 * Wind-rose weather: the long-term mean as the frequency-weighted sum of steady fields, one per cell
 * (sector x speed class x stability class), mean = sum_i f_i field_i.
 *
 * Reuse, where exact (reuseRules in hourlySeries.ts): cells that differ only in speed class share one
 * solve when the field scales exactly as 1 / u (no decay, washout, dry deposition or plume rise, the
 * stability closure or curves); identical cells share a solve always. Rotating a solved field onto
 * another sector is NOT used: on a Cartesian grid it would need interpolation, and the receptors and
 * area-source cells do not rotate with the wind, so it is not exact. The summary reports the solves
 * made, the solves saved and the solve time saved (estimated from the mean solve time), as measured.
 *
 * Short-term standards from a rose: with no time order, the hourly statistics are those of the
 * frequency distribution (each cell occurs f_i of the hours): the percentile is the weighted
 * nearest-rank percentile and the exceedances are the expected hours a year, 8760 sum f_i [PEC_i > limit].
 * Standards on daily or other multi-hour means need the time order and are not computed from a rose
 * (said in the notes and the summary).
 */
import type { WindRoseWeather } from '../../scenarios/format/types.ts';
import {
  HOURS_PER_YEAR,
  percentileForStandard,
  weightedPercentile,
} from '../diagnostics/statistics.ts';
import { CALM_THRESHOLD_m_s, resolveWeather } from '../meteorology/resolveWeather.ts';
import { windRoseFromCells } from '../meteorology/windRoseTable.ts';
import { reuseRules, solveWithReuse, type SeriesBaseInput, type SeriesRunOptions } from './seriesSolves.ts';
import { groundPeak, seriesReceptorColumns } from './seriesStatistics.ts';
import { distinctNotes, meanSourceReports, seriesMassBudget, standardsSummary } from './seriesSummaries.ts';
import { solveSteady } from './solveSteady.ts';
import { seriesGridChecks } from './seriesChecks.ts';
import { isComputable, pcFactorOf } from '../assessment/standards.ts';
import type { ResolvedWeather, ScenarioRunResult } from './types.ts';

/**
 * The resolved weather of each cell of a rose, with its frequency.
 *
 * @throws RangeError naming the cell and field for a bad cell, or frequencies that do not sum to 1
 */
export function windRoseStates(weather: WindRoseWeather, site: { lat: number; lon: number }): { states: ResolvedWeather[]; frequencies: Float64Array } {
  if (weather.cells.length === 0) throw new RangeError('weather.cells: no cells (at least one is needed)');
  let frequencySum = 0;
  const states: ResolvedWeather[] = weather.cells.map((cell, i) => {
    if (!(cell.frequency >= 0 && cell.frequency <= 1)) {
      throw new RangeError(`weather.cells[${i}].frequency: ${cell.frequency} is not allowed (a fraction in 0..1)`);
    }
    frequencySum += cell.frequency;
    return resolveWeather(
      {
        windSpeed_m_s: cell.windSpeed_m_s,
        windFrom_deg: cell.windFrom_deg,
        stability: cell.stability,
        mixingHeight_m: cell.mixingHeight_m,
        rain_mm_h: weather.rain_mm_h,
        airTemperature_K: weather.airTemperature_K,
        anemometerHeight_m: weather.anemometerHeight_m,
      },
      site,
      `weather.cells[${i}]`,
    );
  });
  if (!(Math.abs(frequencySum - 1) <= 1e-3)) {
    throw new RangeError(`weather.cells: the frequencies sum to ${frequencySum}; allowed: 1 (within 0.001)`);
  }
  const frequencies = Float64Array.from(weather.cells, (cell) => cell.frequency);
  return { states, frequencies };
}

/**
 * Run wind-rose weather.
 *
 * @param base grid, placed sources and receptors, pollutant, dispersion, land use, wind profile
 * @param weather the rose: sector width, cells with frequencies summing to 1, rain, temperature, anemometer height
 * @param options mode, site, assessment, progress, solver
 * @returns receptor columns mean_ug_m3, max_ug_m3 (the worst cell) and per hourly or long-term standard
 *   its statistic and exceedances; footprint = the mean ground-level field
 * @throws RangeError naming the cell and field for a bad cell
 * @example const result = await runWindRose(base, scenario.weather, { mode: 'gaussian', site });
 */
export async function runWindRose(
  base: SeriesBaseInput,
  weather: WindRoseWeather,
  options: SeriesRunOptions,
): Promise<ScenarioRunResult> {
  const started = performance.now();
  const control = options.control ?? {};
  const { states, frequencies } = windRoseStates(weather, options.site);

  const rules = reuseRules(base, options.speedScaling ?? true);
  const fields = await solveWithReuse(base, states, options.mode, {
    solve: options.solve ?? solveSteady,
    rules,
    control,
    label: 'wind-rose cell',
    concurrency: options.concurrency,
  });
  const cells = states.length;
  const receptorCount = base.receptors.length;
  const columns = base.grid.nx * base.grid.ny;

  // Frequency-weighted mean and the worst cell, receptors and ground.
  const receptorMean = new Float64Array(receptorCount);
  const receptorMax = new Float64Array(receptorCount);
  const groundMean = new Float64Array(columns);
  const groundMax = new Float64Array(columns);
  const receptorByCell = Array.from({ length: receptorCount }, () => new Float64Array(cells));
  for (let i = 0; i < cells; i++) {
    const solve = fields.solves[fields.solveOfHour[i]];
    const scale = fields.scaleOfHour[i];
    const weight = frequencies[i] * scale;
    for (let r = 0; r < receptorCount; r++) {
      const value = solve.receptors_ug_m3[r] * scale;
      receptorByCell[r][i] = value;
      receptorMean[r] += frequencies[i] * value;
      if (frequencies[i] > 0 && value > receptorMax[r]) receptorMax[r] = value;
    }
    const ground = solve.ground_ug_m3;
    for (let c = 0; c < columns; c++) {
      groundMean[c] += weight * ground[c];
      if (frequencies[i] > 0) {
        const value = ground[c] * scale;
        if (value > groundMax[c]) groundMax[c] = value;
      }
    }
  }

  // Standards: hourly ones from the frequency distribution, long-term ones from the mean.
  const background = options.assessment?.background_ug_m3 ?? 0;
  const notes: string[] = [];
  const standards = [];
  for (const standard of (options.assessment?.standards ?? []).filter(isComputable)) {
    const longTerm = standard.averaging_h >= HOURS_PER_YEAR;
    // figures of the assessed pollutant (NO2 from NOx: ../assessment/standards.ts)
    const factor = pcFactorOf(standard);
    if (!longTerm && standard.averaging_h !== 1) {
      notes.push(
        `standard "${standard.name}" (${standard.averaging_h}-hour means) is not computed from a wind rose: it needs the time order of an hourly series`,
      );
      continue;
    }
    const receptorValues = new Float64Array(receptorCount);
    const receptorExceedances = new Float64Array(receptorCount);
    for (let r = 0; r < receptorCount; r++) {
      if (longTerm) {
        receptorValues[r] = factor * receptorMean[r];
        receptorExceedances[r] = receptorValues[r] + background > standard.limit_ug_m3 ? 1 : 0;
      } else {
        // a positive factor moves every cell alike, so the weighted percentile scales with it
        receptorValues[r] = factor * weightedPercentile(receptorByCell[r], frequencies, percentileForStandard(standard));
        let above = 0;
        for (let i = 0; i < cells; i++) if (factor * receptorByCell[r][i] + background > standard.limit_ug_m3) above += frequencies[i];
        receptorExceedances[r] = above * HOURS_PER_YEAR;
      }
    }
    const groundValues = longTerm ? groundMean.map((value) => factor * value) : null;
    standards.push({ standard, receptorValues, receptorExceedances, longTerm, groundValues });
  }

  const solveSeconds = fields.solves.reduce((sum, s) => sum + s.wallSeconds, 0);
  const meanSolveSeconds = solveSeconds / fields.solves.length;
  notes.push(
    `wind rose: ${cells} cells, ${fields.solves.length} steady solves (${fields.identicalReuses} identical cells reused, ` +
      `${fields.scaledReuses} by exact wind-speed scaling); rotation between sectors not used (not exact on the grid)`,
    ...distinctNotes(fields.solves),
  );
  const checkSummary: Record<string, unknown> = {};
  if (options.mode === 'grid' && options.checks !== undefined) {
    const checks = await seriesGridChecks(base, states, fields, (i) => `wind-rose cell ${i}`, options.checks, control, frequencies);
    checkSummary.modeCheck = checks.modeCheck;
    checkSummary.resolutionCheck = checks.resolutionCheck;
    notes.push(...checks.notes);
  }
  const rose = windRoseFromCells(weather.cells, weather.sectorWidth_deg, CALM_THRESHOLD_m_s);
  let meanSpeed = 0;
  for (let i = 0; i < cells; i++) meanSpeed += frequencies[i] * states[i].windSpeed_m_s;

  const extraSummary: Record<string, unknown> = {
    ...(options.extraSummary ?? {}),
    weather: {
      kind: 'windRose',
      sectorWidth_deg: weather.sectorWidth_deg,
      cells,
      meanWindSpeed_m_s: meanSpeed,
      calmsRule: `representative speeds below ${CALM_THRESHOLD_m_s} m/s raised to ${CALM_THRESHOLD_m_s} m/s`,
      rain_mm_h: weather.rain_mm_h,
      airTemperature_K: weather.airTemperature_K,
      stabilityFrequency: rose.stabilityFrequency,
      windRose: rose,
    },
    series: {
      method: 'frequency-weighted sum of steady fields',
      rules: rules.explanation,
      cells,
      solves: fields.solves.length,
      solvesSaved: cells - fields.solves.length,
      identicalReuses: fields.identicalReuses,
      scaledReuses: fields.scaledReuses,
      solveWallSeconds: solveSeconds,
      estimatedWallSecondsWithoutReuse: meanSolveSeconds * cells,
      rotationReuse: 'not used: rotating a field between sectors is not exact on a Cartesian grid',
    },
    groundGrid: { meanPeak: groundPeak(base, groundMean), worstCellPeak: groundPeak(base, groundMax) },
    ...checkSummary,
  };
  if (options.assessment !== undefined) {
    extraSummary.assessment = standardsSummary(
      base,
      options.assessment,
      standards.map((s) => ({
        standard: s.standard,
        statistic: s.longTerm ? 'frequency-weighted mean' : 'percentile of the hourly frequency distribution',
        percentile: s.longTerm ? undefined : percentileForStandard(s.standard),
        receptorValues: s.receptorValues,
        receptorExceedances: s.receptorExceedances,
        groundValues: s.groundValues,
        exceedanceBasis: s.longTerm ? 'the mean (1 if above the limit)' : 'expected hours a year, 8760 x the frequency of cells above the limit',
      })),
    );
  }
  return {
    mode: options.mode,
    weatherKind: 'windRose',
    grid: base.grid,
    sources: meanSourceReports(fields),
    massBudget_g: seriesMassBudget(fields, frequencies),
    steps: fields.solves.reduce((sum, s) => sum + s.steps, 0),
    wallSeconds: (performance.now() - started) / 1000,
    footprint_ug_m3: groundMean,
    footprintStatistic: 'mean',
    receptorColumns: seriesReceptorColumns(receptorMean, receptorMax, standards),
    standardFields: standards.map((s) => ({
      name: s.standard.name,
      basis: 'statistic' as const,
      receptors_ug_m3: s.receptorValues,
      ground_ug_m3: s.groundValues,
    })),
    notes,
    extraSummary,
    windRose: { table: rose, caption: options.windRoseCaption ?? 'Wind-rose weather of the run' },
  };
}
