/**
 * Siting as the CLI (`plumeplan site`) and the server's site jobs both run it: candidate positions and
 * the site polygon read from the same JSON forms (the CLI reads them from files, the API from the
 * request), the options, and the run; the files are built by `buildSitingFiles` (../writers/siting.ts).
 */
import type { Scenario, SolverMode } from '../../scenarios/format/types.ts';
import type { SteadySolver } from '../../solver/drivers/solveSteady.ts';
import type { RunControl } from '../../solver/drivers/types.ts';
import { runSiting, type CandidateInput, type SitingOptions, type SitingResult } from '../../solver/siting/runSiting.ts';
import type { ReceptorCombination } from '../../solver/siting/sitingMap.ts';

/**
 * Candidates or a polygon that cannot be read. The message starts with the option or field as given
 * and counts entries from 1 (for people); `field` is the JSON path of the entry (for the API).
 */
export class SitingInputError extends Error {
  override name = 'SitingInputError';
  constructor(
    readonly field: string,
    message: string,
    readonly allowed: string,
  ) {
    super(message);
  }
}

function lonLatOf(value: unknown, where: string, field: string): [number, number] {
  if (!Array.isArray(value) || value.length < 2 || typeof value[0] !== 'number' || typeof value[1] !== 'number') {
    throw new SitingInputError(field, `${where}: expected [lon, lat] in degrees; got ${JSON.stringify(value)}`, '[lon, lat] in WGS 84 degrees');
  }
  return [value[0], value[1]];
}

/**
 * Candidates from a GeoJSON FeatureCollection of Points (id from the feature's id or properties.id or
 * properties.name) or a JSON list of {id, lon, lat}.
 * @param field how the candidates are named in messages (the CLI's "--candidates", the API's "candidates")
 * @throws SitingInputError naming the entry
 */
export function parseCandidates(data: unknown, field: string): CandidateInput[] {
  if (Array.isArray(data)) {
    return data.map((entry, n) => {
      const { id, lon, lat } = (entry ?? {}) as { id?: unknown; lon?: unknown; lat?: unknown };
      if (typeof lon !== 'number' || typeof lat !== 'number') {
        throw new SitingInputError(`${field}[${n}]`, `${field}: entry ${n + 1} needs numeric "lon" and "lat" [deg]; got ${JSON.stringify(entry)}`, '{"id", "lon", "lat"} with lon and lat in WGS 84 degrees');
      }
      return { id: id === undefined ? undefined : String(id), lon, lat };
    });
  }
  const collection = data as { type?: unknown; features?: unknown };
  if (collection?.type !== 'FeatureCollection' || !Array.isArray(collection.features)) {
    throw new SitingInputError(field, `${field}: expected a GeoJSON FeatureCollection of Points or a JSON list of {"id", "lon", "lat"}`, 'a GeoJSON FeatureCollection of Points or a list of {"id", "lon", "lat"}');
  }
  return collection.features.map((feature, n) => {
    const { geometry, id, properties } = (feature ?? {}) as { geometry?: { type?: unknown; coordinates?: unknown }; id?: unknown; properties?: Record<string, unknown> | null };
    if (geometry?.type !== 'Point') throw new SitingInputError(`${field}.features[${n}]`, `${field}: feature ${n + 1} is not a Point (got ${JSON.stringify(geometry?.type)})`, 'a Point feature');
    const [lon, lat] = lonLatOf(geometry.coordinates, `${field}: feature ${n + 1}`, `${field}.features[${n}].geometry.coordinates`);
    const name = id ?? properties?.id ?? properties?.name;
    return { id: name === undefined || name === null ? undefined : String(name), lon, lat };
  });
}

/**
 * The site polygon's outer ring from a GeoJSON Polygon, a Feature of one or a FeatureCollection of one.
 * @throws SitingInputError naming the field
 */
export function parseSitePolygon(value: unknown, field: string): [number, number][] {
  let data = value as { type?: unknown; features?: unknown[]; geometry?: unknown; coordinates?: unknown };
  if (data?.type === 'FeatureCollection') {
    if (!Array.isArray(data.features) || data.features.length !== 1) {
      throw new SitingInputError(field, `${field}: the FeatureCollection holds ${Array.isArray(data.features) ? data.features.length : 'no'} features; allowed: exactly one Polygon`, 'exactly one Polygon');
    }
    data = data.features[0] as typeof data;
  }
  if (data?.type === 'Feature') data = data.geometry as typeof data;
  if (data?.type !== 'Polygon' || !Array.isArray(data.coordinates) || !Array.isArray(data.coordinates[0])) {
    throw new SitingInputError(field, `${field}: expected a GeoJSON Polygon (or a Feature or FeatureCollection of one); got ${JSON.stringify(data?.type)}`, 'a GeoJSON Polygon');
  }
  return (data.coordinates[0] as unknown[]).map((position, n) => lonLatOf(position, `${field}: position ${n + 1}`, `${field}.coordinates[0][${n}]`));
}

/** What a siting run takes besides the scenario (the CLI's options). */
export interface SiteRequest {
  mode?: SolverMode;
  stackId?: string;
  receptorIds?: string[];
  /** combine the receptors as a weighted sum (one weight each) instead of the highest */
  weights?: number[];
  candidates?: CandidateInput[];
  sitePolygon?: [number, number][];
  spacing_m?: number;
  standard?: string;
  level_ug_m3?: number;
  forwardRuns?: number;
  footprints?: boolean;
}

/** The receptor combination a request asks for. */
export function combinationOf(weights: number[] | undefined): ReceptorCombination | undefined {
  return weights === undefined ? undefined : { kind: 'weightedSum', weights };
}

/**
 * runSiting's options for a request.
 * @param solve the forward runs' steady solver (undefined: runSiting's own)
 */
export function sitingOptions(request: SiteRequest, solve: SteadySolver | undefined, control: RunControl): SitingOptions {
  return {
    mode: request.mode,
    stackId: request.stackId,
    receptorIds: request.receptorIds,
    combination: combinationOf(request.weights),
    candidates: request.candidates,
    sitePolygon: request.sitePolygon,
    spacing_m: request.spacing_m,
    standardName: request.standard,
    level_ug_m3: request.level_ug_m3,
    forwardRuns: request.forwardRuns,
    keepFootprints: request.footprints === true,
    solve,
    control,
  };
}

/**
 * Site the stack in this thread (a server job is already in a worker thread).
 * @param solve the forward runs' steady solver
 * @throws ScenarioInputError naming the field; UnavailableError for a kind of weather it cannot site
 */
export function computeSiting(scenario: Scenario, request: SiteRequest, solve: SteadySolver | undefined, control: RunControl): Promise<SitingResult> {
  return runSiting(scenario, sitingOptions(request, solve, control));
}
