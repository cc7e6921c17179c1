/**
 * What the server checks of a compare, sweep, stack-height or site request before it queues the run,
 * beyond the request's shape (zod, in ../http/apiSchemas.ts): the options against the stored scenario,
 * with the same functions the run itself uses, so a run that cannot succeed is refused at once (422)
 * naming the field, instead of failing later in a thread. Returns the options as the job takes them.
 * (A scenario run's own options are its consultation pack's: `admitScenarioPack`.)
 */
import type { Scenario } from '../../scenarios/format/types.ts';
import { applySweepValue, SWEEP_PARAMETERS, sweptSourceId, withFixedDomain, type SweepParameter } from '../../solver/assessment/sweep.ts';
import { chooseStandard } from '../../solver/siting/screening.ts';
import { MAX_SWEEP_VALUES } from '../analyses/sweep.ts';
import { parseCandidates, parseSitePolygon, SitingInputError } from '../analyses/siting.ts';
import { resolveStackHeightTarget, STACK_HEIGHT_DEFAULTS, TargetError, type StackHeightRequest } from '../analyses/stackHeight.ts';
import { RESULT_NAME_PATTERN } from '../storage/resultFiles.ts';
import { resolveLevels } from '../cli/run.ts';
import { allowedCrsText, resolveCrs } from '../writers/crs.ts';
import { RunRefusedError } from './admission.ts';
import type { PackChoice } from './runExecutor.ts';

function refuse(field: string, value: unknown, allowed: string, error: string, status = 422): never {
  throw new RunRefusedError(status, { error, field, value, allowed });
}

/** The RangeError's message without the solver's own prefix, for `allowed`. */
function reason(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}

export interface SweepOptionsInput {
  parameter: SweepParameter;
  values: number[];
  sourceId?: string;
}

/** @throws RunRefusedError (422) naming sourceId, parameter or values[i] */
export function admitSweep(scenario: Scenario, input: SweepOptionsInput): Record<string, unknown> {
  if (input.values.length === 0 || input.values.length > MAX_SWEEP_VALUES) {
    refuse('values', input.values.length, `1 to ${MAX_SWEEP_VALUES} values`, `values: ${input.values.length} given; allowed: 1 to ${MAX_SWEEP_VALUES} values`, 400);
  }
  let sourceId: string | undefined = input.sourceId;
  try {
    if (SWEEP_PARAMETERS[input.parameter].perSource) {
      sourceId = sweptSourceId(scenario, input.parameter, input.sourceId);
    }
  } catch (error) {
    refuse('sourceId', input.sourceId, reason(error), reason(error));
  }
  input.values.forEach((value, index) => {
    try {
      applySweepValue(scenario, input.parameter, value, sourceId);
    } catch (error) {
      const message = reason(error);
      if (/is not allowed/.test(message)) refuse(`values[${index}]`, value, message.replace(/^.*is not allowed /, ''), message);
      refuse('parameter', input.parameter, message, message);
    }
  });
  return { parameter: input.parameter, values: input.values, ...(input.sourceId !== undefined ? { sourceId: input.sourceId } : {}) };
}

export type StackHeightOptionsInput = Partial<Pick<StackHeightRequest, 'minHeight_m' | 'maxHeight_m' | 'tolerance_m'>> &
  Omit<StackHeightRequest, 'minHeight_m' | 'maxHeight_m' | 'tolerance_m' | 'at'> & { at?: 'ground' | string[] };

/** @throws RunRefusedError naming target_ug_m3, standard, sourceId, maxHeight_m or at[i] */
export function admitStackHeight(scenario: Scenario, input: StackHeightOptionsInput): Record<string, unknown> {
  if ((input.target_ug_m3 === undefined) === (input.targetPercent === undefined)) {
    refuse('target_ug_m3', input.target_ug_m3, 'either target_ug_m3, or targetPercent with standard', 'give either target_ug_m3 [ug/m3] or targetPercent [%] with standard', 400);
  }
  if (input.targetPercent !== undefined && input.standard === undefined) {
    refuse('standard', undefined, "an assessed standard's name", 'targetPercent needs standard: the standard whose limit it is a percentage of', 400);
  }
  const request: StackHeightRequest = {
    ...(input.target_ug_m3 !== undefined ? { target_ug_m3: input.target_ug_m3 } : {}),
    ...(input.targetPercent !== undefined ? { targetPercent: input.targetPercent, standard: input.standard } : {}),
    at: input.at ?? 'ground',
    minHeight_m: input.minHeight_m ?? STACK_HEIGHT_DEFAULTS.minHeight_m,
    maxHeight_m: input.maxHeight_m ?? STACK_HEIGHT_DEFAULTS.maxHeight_m,
    tolerance_m: input.tolerance_m ?? STACK_HEIGHT_DEFAULTS.tolerance_m,
    ...(input.sourceId !== undefined ? { sourceId: input.sourceId } : {}),
  };
  if (!(request.maxHeight_m > request.minHeight_m)) {
    refuse('maxHeight_m', request.maxHeight_m, `a height above minHeight_m (${request.minHeight_m} m)`, `maxHeight_m: ${request.maxHeight_m} m is not above minHeight_m, ${request.minHeight_m} m`, 400);
  }
  try {
    resolveStackHeightTarget(scenario, request);
  } catch (error) {
    if (!(error instanceof TargetError)) throw error;
    refuse(error.field === 'target' ? 'target_ug_m3' : 'standard', input.standard, error.allowed, `${error.field}: ${error.message}`);
  }
  try {
    sweptSourceId(scenario, 'stackHeight_m', request.sourceId);
  } catch (error) {
    refuse('sourceId', request.sourceId, reason(error), reason(error));
  }
  const base = withFixedDomain(scenario);
  if (base.domain !== undefined && request.maxHeight_m >= base.domain.height_m) {
    refuse('maxHeight_m', request.maxHeight_m, `below the grid's top, domain.height_m = ${base.domain.height_m} m`, `maxHeight_m: ${request.maxHeight_m} m is not below the grid's top, domain.height_m = ${base.domain.height_m} m`);
  }
  if (request.at !== 'ground') {
    const ids = scenario.receptors.map((receptor) => receptor.id);
    request.at.forEach((id, index) => {
      if (!ids.includes(id)) refuse(`at[${index}]`, id, `"ground" or ids of the scenario's receptors: ${ids.join(', ')}`, `at: receptor "${id}" is not in the scenario; use one of ${ids.join(', ')}`);
    });
  }
  return { ...request };
}

export interface SiteOptionsInput {
  stackId?: string;
  receptorIds?: string[];
  weights?: number[];
  candidates?: unknown;
  sitePolygon?: unknown;
  spacing_m?: number;
  standard?: string;
  level_ug_m3?: number;
  forwardRuns?: number;
  footprints?: boolean;
  levels_ug_m3?: number[];
  quick?: boolean;
}

/** @throws RunRefusedError naming the option */
export function admitSite(scenario: Scenario, input: SiteOptionsInput): Record<string, unknown> {
  if (scenario.weather.kind !== 'steady' && scenario.weather.kind !== 'windRose') {
    refuse('scenario.weather.kind', scenario.weather.kind, 'steady or windRose', `siting from ${scenario.weather.kind} weather is not built; give the weather as one steady state or a wind rose`);
  }
  const stacks = scenario.sources.filter((source) => source.kind === 'point').map((source) => source.id);
  if (input.stackId !== undefined ? !stacks.includes(input.stackId) : stacks.length === 0) {
    refuse('stackId', input.stackId, stacks.length === 0 ? 'none: the scenario has no point source' : `one of ${stacks.join(', ')}`, `stackId: ${JSON.stringify(input.stackId)} is not a point source of the scenario`);
  }
  const receptorIds = scenario.receptors.map((receptor) => receptor.id);
  input.receptorIds?.forEach((id, index) => {
    if (!receptorIds.includes(id)) refuse(`receptorIds[${index}]`, id, `one of ${receptorIds.join(', ')}`, `receptorIds: "${id}" is not a receptor of the scenario`);
  });
  const chosen = input.receptorIds?.length ?? receptorIds.length;
  if (chosen === 0) refuse('receptorIds', input.receptorIds, 'at least one receptor', 'siting needs at least one sensitive receptor');
  if (input.weights !== undefined && input.weights.length !== chosen) {
    refuse('weights', input.weights, `one weight per receptor (${chosen})`, `weights: ${input.weights.length} given for ${chosen} receptors`, 400);
  }
  let candidates;
  let sitePolygon;
  try {
    candidates = input.candidates === undefined ? undefined : parseCandidates(input.candidates, 'candidates');
    sitePolygon = input.sitePolygon === undefined ? undefined : parseSitePolygon(input.sitePolygon, 'sitePolygon');
  } catch (error) {
    if (!(error instanceof SitingInputError)) throw error;
    refuse(error.field, undefined, error.allowed, error.message, 400);
  }
  candidates?.forEach((candidate, index) => {
    if (!(Math.abs(candidate.lat) <= 90) || !(Math.abs(candidate.lon) <= 180)) {
      refuse(`candidates[${index}]`, candidate, 'WGS 84 degrees (lon -180..180, lat -90..90)', `candidates[${index}]: lon ${candidate.lon}, lat ${candidate.lat} are not WGS 84 degrees`, 400);
    }
    if (input.footprints === true && candidate.id !== undefined && !RESULT_NAME_PATTERN.test(`footprint-${candidate.id}.geojson`)) {
      refuse(`candidates[${index}].id`, candidate.id, 'with footprints: lower-case letters, digits, dots and dashes', `candidates[${index}].id: ${JSON.stringify(candidate.id)} cannot name a result file footprint-ID.geojson`, 400);
    }
  });
  if (input.standard !== undefined) {
    try {
      chooseStandard(scenario.assessment?.standards ?? [], scenario.weather.kind as 'steady' | 'windRose', input.standard);
    } catch (error) {
      refuse('standard', input.standard, reason(error).replace(/^.*allowed: /, ''), reason(error));
    }
  }
  const options: Record<string, unknown> = { ...input };
  delete options.candidates;
  delete options.sitePolygon;
  return { ...options, ...(candidates !== undefined ? { candidates } : {}), ...(sitePolygon !== undefined ? { sitePolygon } : {}) };
}

export interface ScenarioPackInput {
  levels_ug_m3?: number[];
  percentOf?: string;
  resolutionCheck?: boolean;
  pack?: PackChoice;
  crs?: string | number;
  contextLayers?: { name: string; features: unknown }[];
}

/** The options of a scenario run that make its pack, not its core files. */
const PACK_OPTIONS = ['pack', 'crs', 'contextLayers'] as const;

/** A scenario run's options without its pack's: what its core files depend on. */
export function withoutPack(options: Record<string, unknown>): Record<string, unknown> {
  const rest = { ...options };
  for (const key of PACK_OPTIONS) delete rest[key];
  return rest;
}

/**
 * A scenario run's own options, as plumeplan run's: footprint levels (in ug/m3, or as percentages of
 * an assessed standard with percentOf, checked with the CLI's resolveLevels), the resolution check,
 * and the pack: which, the CRS of ground.tif and the map (checked with the writers' own resolveCrs),
 * the context layers (GeoJSON Features with geometry). Options left at their defaults are left out, so
 * a plain run is identical to one from before these options existed.
 * @throws RunRefusedError (400, 422) naming percentOf, crs, contextLayers[i]...
 */
export function admitScenarioPack(scenario: Scenario, input: ScenarioPackInput): Record<string, unknown> {
  const core: Record<string, unknown> = {};
  if (input.levels_ug_m3 !== undefined) core.levels_ug_m3 = input.levels_ug_m3;
  if (input.percentOf !== undefined) {
    const levels = resolveLevels(scenario, { levels_ug_m3: input.levels_ug_m3, percentOf: input.percentOf });
    if (typeof levels === 'string') refuse('percentOf', input.percentOf, "an assessed standard's name", levels.replace(/^--percent-of: /, 'percentOf: '));
    core.percentOf = input.percentOf;
  }
  if (input.resolutionCheck === true) core.resolutionCheck = true;
  const pack = input.pack ?? 'none';
  if (pack === 'none') {
    if (input.crs !== undefined) refuse('crs', input.crs, 'crs only with pack "quick" or "full"', 'crs: the CRS of ground.tif and the map figure needs pack "quick" or "full"', 400);
    if (input.contextLayers !== undefined) refuse('contextLayers', undefined, 'contextLayers only with pack "quick" or "full"', 'contextLayers: the map figure\'s layers need pack "quick" or "full"', 400);
    return core;
  }
  let crs: string | undefined;
  if (input.crs !== undefined) {
    try {
      crs = `EPSG:${resolveCrs(input.crs).epsg}`;
    } catch (error) {
      refuse('crs', input.crs, allowedCrsText(), reason(error), 400);
    }
  }
  input.contextLayers?.forEach((layer, index) => {
    const features = (layer.features as { type?: unknown; features?: unknown })?.type === 'FeatureCollection' ? (layer.features as { features: unknown }).features : layer.features;
    if (!Array.isArray(features)) {
      refuse(`contextLayers[${index}].features`, undefined, 'a GeoJSON FeatureCollection or a list of Features', `contextLayers[${index}].features: not a GeoJSON FeatureCollection or a list of Features`, 400);
    }
    features.forEach((feature: unknown, n: number) => {
      const { type, geometry } = (feature ?? {}) as { type?: unknown; geometry?: { type?: unknown; coordinates?: unknown } | null };
      const geometryTypes = ['Point', 'MultiPoint', 'LineString', 'MultiLineString', 'Polygon', 'MultiPolygon'];
      if (type !== 'Feature' || geometry === null || typeof geometry !== 'object' || !geometryTypes.includes(String(geometry.type)) || !Array.isArray(geometry.coordinates)) {
        refuse(`contextLayers[${index}].features[${n}]`, undefined, `a GeoJSON Feature with a geometry (${geometryTypes.join(', ')}) in WGS 84 lon/lat`, `contextLayers[${index}].features[${n}]: not a GeoJSON Feature with a geometry`, 400);
      }
    });
  });
  return { ...core, pack, ...(crs !== undefined ? { crs } : {}), ...(input.contextLayers !== undefined ? { contextLayers: input.contextLayers } : {}) };
}

/** The options of runs with larger packs (same CRS and layers), whose files include these options' files. */
export function largerPacks(options: Record<string, unknown>): Record<string, unknown>[] {
  const order: PackChoice[] = ['none', 'quick', 'full'];
  const pack = (options.pack as PackChoice | undefined) ?? 'none';
  return order.slice(order.indexOf(pack) + 1).map((larger) => ({ ...options, pack: larger }));
}
