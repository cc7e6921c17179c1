/**
 * Siting a stack: from a scenario and the positions to consider, the siting map (./sitingMap.ts), the
 * best position on the site, and the candidates ranked by the highest PC at the sensitive receptors, with
 * forward runs for the ground-level peak and the area above a level. Pure: the command line and the
 * server's jobs call it and write what it returns.
 */
import type { AirQualityStandard, Scenario, SolverMode, WeatherHour } from '../../scenarios/format/types.ts';
import { ScenarioInputError, steadyInput } from '../drivers/runScenario.ts';
import { solveSteady, UnavailableError, type SteadySolver } from '../drivers/solveSteady.ts';
import type { PlacedPointSource, PlacedReceptor, RunControl } from '../drivers/types.ts';
import { windRoseStates } from '../drivers/windRose.ts';
import { prepareScenarioGeometry } from '../grid/scenarioGeometry.ts';
import type { LocalGrid } from '../grid/types.ts';
import { isInsideGrid } from '../grid/localGrid.ts';
import { resolveWeatherWithSource } from '../meteorology/resolveWeather.ts';
import { partOfProgress } from './adjointSolve.ts';
import { isInsideRing } from '../grid/siteBoundary.ts';
import { columnsInsideRing, latticeInsideRing, lowestColumn } from './candidates.ts';
import { isLongTerm as isLongTermStandard } from '../assessment/standards.ts';
import { chooseStandard, screenFor, type ScreenedPc, type ScreeningVerdict } from './screening.ts';
import { gaussianSitingMap, gridSitingMap, SITING_LIMITS, type PcAt, type ReceptorCombination, type SitingMap, type WeightedWeather } from './sitingMap.ts';

/** A candidate position as given: WGS 84 degrees, with an optional id. */
export interface CandidateInput {
  id?: string;
  lon: number;
  lat: number;
}

export interface SitingOptions {
  /** overrides scenario.solver.mode */
  mode?: SolverMode;
  /** the point source being sited (default the scenario's first point source) */
  stackId?: string;
  /** the sensitive receptors by id (default every receptor of the scenario) */
  receptorIds?: string[];
  /** how receptors combine (default the highest) */
  combination?: ReceptorCombination;
  /** candidate positions to rank */
  candidates?: CandidateInput[];
  /** the site polygon, a closed [lon, lat] ring (default the scenario's site.boundary, when it has one) */
  sitePolygon?: [number, number][];
  /** lattice spacing the site polygon is sampled at for candidates [m] (default: the grid spacing) */
  spacing_m?: number;
  /** the standard to compare with, by name (default: see chooseStandard) */
  standardName?: string;
  /** level whose ground area each forward run reports [ug/m3] (default: the standard's screening threshold) */
  level_ug_m3?: number;
  /** how many of the ranked candidates get a forward run (default: all of them, up to 50 in grid mode) */
  forwardRuns?: number;
  /** keep each forward-run candidate's ground-level field (for its footprint) */
  keepFootprints?: boolean;
  /** the steady solver of the forward runs (default solveSteady, in process) */
  solve?: SteadySolver;
  control?: RunControl;
}

export interface RankedCandidate {
  /** 1 = lowest combined PC */
  rank: number;
  id: string;
  /** "list" (given) or "sitePolygon" (the polygon's lattice) */
  origin: 'list' | 'sitePolygon';
  lon: number;
  lat: number;
  x_m: number;
  y_m: number;
  /** PC at each sensitive receptor from the siting map [ug/m3], in the order of SitingResult.receptorIds */
  receptorPc_ug_m3: number[];
  /** the highest of them and whose it is */
  highestPc_ug_m3: number;
  highestReceptorId: string;
  /** the map's combined value here (equals highestPc_ug_m3 for the default combination) */
  combined_ug_m3: number;
  /** highest PC as % of the standard, its threshold and the verdict (null without a standard) */
  percentOfStandard: number | null;
  verdict: ScreeningVerdict | null;
  /** from a forward run of the stack here (null when not run): ground-level peak [ug/m3] */
  groundPeak_ug_m3: number | null;
  /** ground area at or above the level [m2] (null when not run or no level) */
  areaAboveLevel_m2: number | null;
  /** receptor PCs from the forward run [ug/m3] (null when not run), for the agreement check */
  forwardReceptorPc_ug_m3: number[] | null;
  /** the forward run's ground-level field [ug/m3], i + nx * j, when footprints were asked for */
  groundLevel_ug_m3?: Float64Array;
}

export interface BestPosition {
  x_m: number;
  y_m: number;
  lon: number;
  lat: number;
  combined_ug_m3: number;
  receptorPc_ug_m3: number[];
  /** where it was sought: "site polygon" or "whole domain" */
  within: 'site polygon' | 'whole domain';
  /** "map" (a column centre) or "candidate <id>" (a candidate inside the site that is lower still) */
  from: string;
}

export interface SitingResult {
  scenarioName: string;
  pollutant: string;
  mode: SolverMode;
  weatherKind: 'steady' | 'windRose' | 'hourly';
  /** what every map value is: "concentration" (one steady state, an hourly value) or "mean" (a rose's or an hourly series' long-term mean) */
  statistic: 'concentration' | 'mean';
  grid: LocalGrid;
  map: SitingMap;
  stack: { id: string; height_m: number; diameter_m: number; exitVelocity_m_s: number; exitTemperature_K: number; emission_g_s: number; plumeRise: boolean };
  receptors: { id: string; name: string; x_m: number; y_m: number; height_m: number }[];
  /** the site polygon in local metres and its column mask (null without one) */
  siteRing_m: [number, number][] | null;
  siteMask: Uint8Array | null;
  sampleSpacing_m: number | null;
  best: BestPosition;
  candidates: RankedCandidate[];
  standard: (AirQualityStandard & { threshold_percent: number }) | null;
  level_ug_m3: number | null;
  /** largest |adjoint - forward| receptor PC over the forward-run candidates, as a fraction of the largest forward PC (null without forward runs) */
  forwardAgreement: number | null;
  /** time of the map alone and of the forward runs [s] */
  mapSeconds: number;
  forwardSeconds: number;
  forwardRunCount: number;
  wallSeconds: number;
  limits: readonly string[];
  notes: string[];
}

/**
 * An hourly series as weighted weather states: the hours' resolved weathers, identical ones grouped, each
 * weighted by its share of the hours present. The series' mean at a position is then the weighted sum of
 * the distinct states' values, exactly (each hour an independent steady state; gaps are not filled in,
 * the mean is over the hours present, as the forward series runner takes it).
 *
 * @throws RangeError naming the hour whose weather cannot be resolved, or an empty series
 */
export function distinctHours(hours: readonly WeatherHour[], site: Scenario['site']): WeightedWeather[] {
  if (hours.length === 0) throw new RangeError('weather.hours: the series is empty (at least one hour is needed)');
  const byKey = new Map<string, WeightedWeather>();
  hours.forEach((hour, h) => {
    const state = resolveWeatherWithSource(hour, site, `weather.hours[${h}]`).weather;
    const key = JSON.stringify(Object.entries(state).sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0)));
    const known = byKey.get(key);
    if (known === undefined) byKey.set(key, { weather: state, weight: 1 / hours.length });
    else known.weight += 1 / hours.length;
  });
  return [...byKey.values()];
}

/** Candidates read exactly in grid mode (each its own near-field plan); a larger site lattice is read from the map. */
export const EXACT_CANDIDATES = 200;

/** Forward runs in grid mode, at most, unless asked for more. */
export const DEFAULT_GRID_FORWARD_RUNS = 50;

/**
 * Site a stack.
 *
 * @param scenario a parsed scenario with steady, wind-rose or hourly weather and at least one point source
 * @param options stack, receptors, candidates or site polygon, standard, forward runs, progress
 * @returns the map, the best position, the ranked candidates, the limits and notes
 * @throws ScenarioInputError naming the field for input that cannot be used
 * @example const result = await runSiting(scenario, { candidates: [{ lon: -2.284, lat: 54.061 }] });
 */
export async function runSiting(scenario: Scenario, options: SitingOptions = {}): Promise<SitingResult> {
  const started = performance.now();
  const control = options.control ?? {};
  const mode = options.mode ?? scenario.solver.mode;
  try {
    return await site(scenario, mode, options, control, started);
  } catch (error) {
    if (error instanceof RangeError) throw new ScenarioInputError(error.message, { cause: error });
    throw error;
  }
}

async function site(scenario: Scenario, mode: SolverMode, options: SitingOptions, control: RunControl, started: number): Promise<SitingResult> {
  control.onProgress?.(0, 'preparing the grid');
  const geometry = prepareScenarioGeometry(scenario);
  const { grid, projection } = geometry;
  const stacks = geometry.sources.filter((source): source is PlacedPointSource => source.kind === 'point');
  const stack = options.stackId === undefined ? stacks[0] : stacks.find((source) => source.id === options.stackId);
  if (stack === undefined) {
    throw new RangeError(
      options.stackId === undefined
        ? 'sources: the scenario has no point source to site'
        : `stack "${options.stackId}" is not a point source of the scenario; allowed: ${stacks.map((source) => `"${source.id}"`).join(', ') || 'none'}`,
    );
  }
  const receptors: PlacedReceptor[] =
    options.receptorIds === undefined
      ? geometry.receptors
      : options.receptorIds.map((id) => {
          const receptor = geometry.receptors.find((candidate) => candidate.id === id);
          if (receptor === undefined) throw new RangeError(`receptor "${id}" is not in the scenario; allowed: ${geometry.receptors.map((r) => `"${r.id}"`).join(', ')}`);
          return receptor;
        });
  if (receptors.length === 0) throw new RangeError('receptors: siting needs at least one sensitive receptor');

  const weather = scenario.weather;
  let weathers: WeightedWeather[];
  if (weather.kind === 'steady') {
    weathers = [{ weather: resolveWeatherWithSource(weather, scenario.site, 'weather').weather, weight: 1 }];
  } else if (weather.kind === 'windRose') {
    const { states, frequencies } = windRoseStates(weather, scenario.site);
    weathers = states.map((state, n) => ({ weather: state, weight: frequencies[n] }));
  } else if (weather.kind === 'hourly') {
    weathers = distinctHours(weather.hours, scenario.site);
  } else {
    throw new UnavailableError(
      `siting from weather of kind "${weather.kind}" is not built: give steady weather, a wind rose or an hourly series ` +
        '(a screening set asks for the highest over its states, which a mean map does not give)',
    );
  }
  const statistic = weather.kind === 'steady' ? 'concentration' : 'mean';
  const standards = scenario.assessment?.standards ?? [];
  const standard = chooseStandard(standards, weather.kind as SitingResult['weatherKind'], options.standardName);
  const screen =
    standard === null
      ? null
      : screenFor(standard, weather.kind as SitingResult['weatherKind'], scenario.assessment?.background_ug_m3 ?? 0, scenario.assessment?.screening);
  const threshold_percent = screen === null ? null : screen(0).threshold_percent;
  const level_ug_m3 = options.level_ug_m3 ?? (standard !== null && threshold_percent !== null ? (standard.limit_ug_m3 * threshold_percent) / 100 : null);
  if (level_ug_m3 !== null && !(level_ug_m3 > 0 && Number.isFinite(level_ug_m3))) throw new RangeError(`level is ${level_ug_m3} ug/m3; allowed: a finite level > 0`);

  // The site polygon and the best position.
  const polygon = options.sitePolygon ?? scenario.site.boundary;
  const polygonField = options.sitePolygon !== undefined ? 'site polygon' : 'site.boundary';
  const siteRing_m = polygon === undefined ? null : polygon.map(([lon, lat]) => projection.toLocal(lon, lat));
  const siteMask = siteRing_m === null ? null : columnsInsideRing(grid, siteRing_m, polygonField);
  // The candidates: the list, then the polygon's lattice.
  const spacing_m = options.spacing_m ?? grid.spacing_m;
  const positions: { id: string; origin: RankedCandidate['origin']; x_m: number; y_m: number }[] = [];
  (options.candidates ?? []).forEach((candidate, n) => {
    if (!(Math.abs(candidate.lat) <= 90) || !(Math.abs(candidate.lon) <= 180)) {
      throw new RangeError(`candidates[${n}]: lon ${candidate.lon}, lat ${candidate.lat}; allowed: WGS 84 degrees (lon -180..180, lat -90..90)`);
    }
    const [x_m, y_m] = projection.toLocal(candidate.lon, candidate.lat);
    if (!isInsideGrid(grid, x_m, y_m)) {
      throw new RangeError(`candidates[${n}] (${candidate.id ?? `c${n + 1}`}): ${x_m.toFixed(0)} m east, ${y_m.toFixed(0)} m north of the site is outside the grid; allowed: inside the domain`);
    }
    positions.push({ id: candidate.id ?? `c${n + 1}`, origin: 'list', x_m, y_m });
  });
  if (siteRing_m !== null) {
    latticeInsideRing(siteRing_m, spacing_m, polygonField).forEach(([x_m, y_m], n) => {
      if (isInsideGrid(grid, x_m, y_m)) positions.push({ id: `site-${n + 1}`, origin: 'sitePolygon', x_m, y_m });
    });
  }
  const ids = new Set<string>();
  for (const { id } of positions) {
    if (ids.has(id)) throw new RangeError(`candidates: the id "${id}" is given twice; allowed: unique ids`);
    ids.add(id);
  }
  // The map.
  const base = { ...steadyInput(scenario, geometry, weathers[0].weather), receptors };
  // Grid mode reads candidates exactly, each with its own near-field plan per weather state (16 ms each
  // on the demo); a site lattice beyond EXACT_CANDIDATES is read from the map between column centres.
  const exactAt = positions.length <= EXACT_CANDIDATES ? positions : positions.filter((position) => position.origin === 'list');
  const mapOptions = { combination: options.combination, control: partOfProgress(control, 0, 2, 'siting map'), exactAt };
  const mapStarted = performance.now();
  const { map, pcAt } = mode === 'grid' ? gridSitingMap(base, stack, weathers, mapOptions) : gaussianSitingMap(base, stack, weathers, mapOptions);
  const mapSeconds = (performance.now() - mapStarted) / 1000;

  const candidates = rankCandidates(positions, receptors, map, pcAt, screen, projection.toLonLat);

  // The best position: the lowest column centre inside the site (or anywhere without one), unless a
  // candidate inside the site (a lattice point on its edge, say) is lower still.
  const bestColumn = lowestColumn(map.combined_ug_m3, siteMask);
  if (bestColumn < 0) throw new RangeError(`${polygonField}: no grid column centre lies inside it (grid spacing ${grid.spacing_m} m); draw a larger polygon or use a finer grid`);
  const bestX = grid.xWest_m + ((bestColumn % grid.nx) + 0.5) * grid.spacing_m;
  const bestY = grid.ySouth_m + (Math.floor(bestColumn / grid.nx) + 0.5) * grid.spacing_m;
  const [bestLon, bestLat] = projection.toLonLat(bestX, bestY);
  let best: BestPosition = {
    x_m: bestX,
    y_m: bestY,
    lon: bestLon,
    lat: bestLat,
    combined_ug_m3: map.combined_ug_m3[bestColumn],
    receptorPc_ug_m3: map.perReceptor_ug_m3.map((values) => values[bestColumn]),
    within: siteMask === null ? 'whole domain' : 'site polygon',
    from: 'map',
  };
  const bestCandidate = candidates.find((candidate) => siteRing_m === null || candidate.origin === 'sitePolygon' || isInsideRing(siteRing_m, candidate.x_m, candidate.y_m));
  if (bestCandidate !== undefined && bestCandidate.combined_ug_m3 < best.combined_ug_m3) {
    best = { ...best, x_m: bestCandidate.x_m, y_m: bestCandidate.y_m, lon: bestCandidate.lon, lat: bestCandidate.lat, combined_ug_m3: bestCandidate.combined_ug_m3, receptorPc_ug_m3: [...bestCandidate.receptorPc_ug_m3], from: `candidate ${bestCandidate.id}` };
  }

  // Forward runs of the best-ranked candidates: the ground peak, the area above the level, and a check
  // of the map against the forward receptors.
  const forwardCount = Math.min(candidates.length, options.forwardRuns ?? (mode === 'grid' ? DEFAULT_GRID_FORWARD_RUNS : candidates.length));
  if (!(forwardCount >= 0) || !Number.isInteger(forwardCount)) throw new RangeError(`forward runs: ${options.forwardRuns}; allowed: a whole number >= 0`);
  const solve = options.solve ?? solveSteady;
  const forwardStarted = performance.now();
  let worstDifference = 0;
  let largestForward = 0;
  for (let n = 0; n < forwardCount; n++) {
    const candidate = candidates[n];
    const moved: PlacedPointSource = { ...stack, x_m: candidate.x_m, y_m: candidate.y_m };
    const ground = new Float64Array(grid.nx * grid.ny);
    const forwardReceptors = new Array<number>(receptors.length).fill(0);
    for (let w = 0; w < weathers.length; w++) {
      const { weather: state, weight } = weathers[w];
      if (weight === 0) continue;
      const runControl = partOfProgress(partOfProgress(control, 1, 2, 'forward runs'), n * weathers.length + w, forwardCount * weathers.length, `candidate ${candidate.id}`);
      const field = await solve({ ...base, sources: [moved], weather: state }, mode, runControl);
      for (let c = 0; c < ground.length; c++) ground[c] += weight * field.groundLevel_ug_m3[c];
      for (let r = 0; r < receptors.length; r++) forwardReceptors[r] += weight * field.receptors_ug_m3[r];
    }
    let peak = 0;
    let above = 0;
    for (let c = 0; c < ground.length; c++) {
      if (ground[c] > peak) peak = ground[c];
      if (level_ug_m3 !== null && ground[c] >= level_ug_m3) above++;
    }
    candidate.groundPeak_ug_m3 = peak;
    candidate.areaAboveLevel_m2 = level_ug_m3 === null ? null : above * grid.spacing_m * grid.spacing_m;
    candidate.forwardReceptorPc_ug_m3 = forwardReceptors;
    if (options.keepFootprints === true) candidate.groundLevel_ug_m3 = ground;
    forwardReceptors.forEach((value, r) => {
      largestForward = Math.max(largestForward, value);
      worstDifference = Math.max(worstDifference, Math.abs(value - candidate.receptorPc_ug_m3[r]));
    });
  }
  const forwardSeconds = (performance.now() - forwardStarted) / 1000;
  const forwardAgreement = forwardCount > 0 && largestForward > 0 ? worstDifference / largestForward : null;

  const notes = [...map.notes];
  notes.push(
    weather.kind === 'steady'
      ? 'one steady weather state: every PC is the concentration of that one hour of weather, comparable with a short-term standard only'
      : weather.kind === 'windRose'
        ? `wind rose of ${weathers.length} cells: every PC is the frequency-weighted mean (the long-term mean); percentiles are not mapped`
        : `hourly series of ${weather.kind === 'hourly' ? weather.hours.length : 0} hours, ${weathers.length} distinct weather states (identical hours grouped): every PC is the mean over the hours present, ` +
          'each hour its own steady state (as solver.hourlyMethod "independentHours"); percentiles are not mapped (see docs/siting.md)',
  );
  if (weather.kind === 'hourly' && scenario.solver.hourlyMethod === 'continuous') {
    notes.push('the scenario runs its series as one continuous time-march; the map takes each hour as its own steady state (independent hours), so it can differ from that run where the field carries over from hour to hour');
  }
  if (siteMask === null) notes.push('no site polygon: the best position is the lowest value in the whole domain, often at an edge far from the receptors; give a site polygon to confine it');
  if (forwardAgreement !== null) {
    notes.push(`forward runs at ${forwardCount} candidates agree with the map's receptor PCs ${forwardAgreement === 0 ? 'exactly' : `within ${(100 * forwardAgreement).toPrecision(2)} % of the largest forward PC`}`);
  }
  if (mode === 'grid' && exactAt.length < positions.length) {
    notes.push(`${positions.length - exactAt.length} site-lattice candidates (more than ${EXACT_CANDIDATES} in all) are read from the map between column centres, not each with its own near-field plan: near a receptor they can differ from a forward run by more than the map's columns do`);
  }
  if (candidates.length > forwardCount) notes.push(`${candidates.length - forwardCount} lower-ranked candidates have no forward run (no ground peak or area)`);
  if (standard !== null) {
    notes.push(`verdicts: the assessment's screen of permit guidance (PC below ${threshold_percent} % of ${standard.name}${isLongTermStandard(standard) ? ', then PEC below the long-term threshold' : ''}), common practice and never a legal decision${weather.kind === 'steady' || !isLongTermStandard(standard) ? '; one steady state (or a mean against a short-term standard) gives indicative figures only, no screen decision' : ''}`);
  }
  control.onProgress?.(1, 'siting done');
  return {
    scenarioName: scenario.name,
    pollutant: scenario.pollutant.name,
    mode,
    weatherKind: weather.kind as SitingResult['weatherKind'],
    statistic,
    grid,
    map,
    stack: {
      id: stack.id,
      height_m: stack.height_m,
      diameter_m: stack.diameter_m,
      exitVelocity_m_s: stack.exitVelocity_m_s,
      exitTemperature_K: stack.exitTemperature_K,
      emission_g_s: stack.emission_g_s,
      plumeRise: stack.plumeRise,
    },
    receptors: receptors.map((receptor) => ({
      id: receptor.id,
      name: scenario.receptors.find((given) => given.id === receptor.id)?.name ?? receptor.id,
      x_m: receptor.x_m,
      y_m: receptor.y_m,
      height_m: receptor.height_m,
    })),
    siteRing_m: siteRing_m as [number, number][] | null,
    siteMask,
    sampleSpacing_m: siteRing_m === null ? null : spacing_m,
    best,
    candidates,
    standard: standard === null || threshold_percent === null ? null : { ...standard, threshold_percent },
    level_ug_m3,
    forwardAgreement,
    mapSeconds,
    forwardSeconds,
    forwardRunCount: forwardCount,
    wallSeconds: (performance.now() - started) / 1000,
    limits: SITING_LIMITS,
    notes,
  };
}

/**
 * Rank positions by the map's combined value (lowest first; ties by id), with each receptor's PC and
 * the screen against the standard.
 */
export function rankCandidates(
  positions: readonly { id: string; origin: RankedCandidate['origin']; x_m: number; y_m: number }[],
  receptors: readonly PlacedReceptor[],
  map: SitingMap,
  pcAt: PcAt,
  /** the screen against the chosen standard (null without one) */
  screen: ((pc_ug_m3: number) => ScreenedPc) | null,
  toLonLat: (x_m: number, y_m: number) => [number, number],
): RankedCandidate[] {
  const weights = map.receptorWeights;
  const ranked = positions.map((position) => {
    const receptorPc = receptors.map((_, r) => pcAt(r, position.x_m, position.y_m));
    let highest = 0;
    for (let r = 1; r < receptorPc.length; r++) if (receptorPc[r] > receptorPc[highest]) highest = r;
    const combined = weights === null ? receptorPc[highest] : receptorPc.reduce((sum, value, r) => sum + weights[r] * value, 0);
    const screened = screen === null ? null : screen(receptorPc[highest]);
    const [lon, lat] = toLonLat(position.x_m, position.y_m);
    const candidate: RankedCandidate = {
      rank: 0,
      id: position.id,
      origin: position.origin,
      lon,
      lat,
      x_m: position.x_m,
      y_m: position.y_m,
      receptorPc_ug_m3: receptorPc,
      highestPc_ug_m3: receptorPc[highest],
      highestReceptorId: receptors[highest].id,
      combined_ug_m3: combined,
      percentOfStandard: screened?.percentOfStandard ?? null,
      verdict: screened?.verdict ?? null,
      groundPeak_ug_m3: null,
      areaAboveLevel_m2: null,
      forwardReceptorPc_ug_m3: null,
    };
    return candidate;
  });
  ranked.sort((a, b) => a.combined_ug_m3 - b.combined_ug_m3 || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
  ranked.forEach((candidate, n) => (candidate.rank = n + 1));
  return ranked;
}
