/**
 * The siting result's files: the ranked candidates (candidates.csv, machine-clean RFC 4180, and
 * siting.json, the whole result with the caution and the limits), the map as GeoTIFFs (siting-map.tif,
 * the receptors combined, and siting-map-<receptor>.tif per receptor when there are at most
 * MAX_RECEPTOR_RASTERS, written by the pack's GeoTIFF writer, ./groundGeoTiff.ts: the site's UTM zone,
 * nearest-cell resampling so every pixel is a value the map holds, nodata off the site and outside the
 * grid, the caution in the description) and as GeoJSON (siting.geojson: the map's isopleth bands, drawn by footprint.ts's contouring, the best
 * position, the candidates, the receptors and the site polygon), and on request each forward-run
 * candidate's ground-level footprint; the siting figure and report (./sitingReport.ts).
 */
import { mkdir, rm, stat, writeFile } from 'node:fs/promises';
import path from 'node:path';
import type { Feature, Geometry } from 'geojson';
import type { Scenario } from '../../scenarios/format/types.ts';
import type { RankedCandidate, SitingResult } from '../../solver/siting/runSiting.ts';
import { SCREENING_CAUTION } from './caution.ts';
import { defaultFootprintLevels, footprintBands, type FootprintCollection } from './footprint.ts';
import { GEOTIFF_NODATA, writeGroundGeoTiff } from './groundGeoTiff.ts';
import { CONCENTRATION_SIGNIFICANT_FIGURES, LON_LAT_DECIMALS, roundDecimals, roundSignificant } from './rounding.ts';
import { csvField } from './receptorsCsv.ts';
import { buildSitingReportFiles, SITING_MAP_PNG_FILE, SITING_MAP_SVG_FILE, SITING_REPORT_HTML_FILE, SITING_REPORT_PDF_FILE } from './sitingReport.ts';
import { formatFootprint } from './writeResultFolder.ts';

export const SITING_JSON_FILE = 'siting.json';
export const CANDIDATES_CSV_FILE = 'candidates.csv';
export const SITING_MAP_FILE = 'siting-map.tif';
export const SITING_GEOJSON_FILE = 'siting.geojson';
export const SITING_FORMAT = 'plumeplan.siting/1';

/** Receptors up to this many get a raster each (siting-map-<id>.tif); more, only the combined map. */
export const MAX_RECEPTOR_RASTERS = 5;

/** File name of one receptor's raster. */
export function receptorRasterFile(receptorId: string): string {
  return `siting-map-${receptorId.replace(/[^\w.-]/g, '_')}.tif`;
}

/** The receptors' rasters written, by receptor id (none when there are more than MAX_RECEPTOR_RASTERS). */
function receptorRasters(result: SitingResult): Record<string, string> {
  if (result.receptors.length > MAX_RECEPTOR_RASTERS) return {};
  return Object.fromEntries(result.receptors.map((receptor) => [receptor.id, receptorRasterFile(receptor.id)]));
}

const LINE_END = '\r\n';
const pc = (value: number): number => roundSignificant(value, CONCENTRATION_SIGNIFICANT_FIGURES);
const degrees = (value: number): number => roundDecimals(value, LON_LAT_DECIMALS);
const metres = (value: number): number => roundDecimals(value, 1);
/** Percentages to two significant figures: what a person reads, no false precision. */
const percent = (value: number): number => roundSignificant(value, 2);

/** What a map value means, in words, for file headers and properties. */
export function mapMeaning(result: SitingResult): string {
  const what = result.statistic === 'mean' ? 'long-term mean PC' : 'PC in the one steady weather state';
  return `${result.map.combination} ${what} [ug/m3] if the stack ${result.stack.id} stood at each grid column centre`;
}

/**
 * candidates.csv: one row per candidate, best first. Columns: rank, id, origin, lon, lat, x_m, y_m, the
 * combined value, the highest receptor PC and whose, each receptor's PC, % of the standard, the verdict,
 * and from the forward run the ground peak and the area at or above the level (empty when not run).
 */
export function candidatesCsv(result: SitingResult): string {
  const header = [
    'rank', 'id', 'origin', 'lon', 'lat', 'x_m', 'y_m', 'combined_ug_m3', 'highest_pc_ug_m3', 'highest_receptor',
    ...result.receptors.map((receptor) => `pc_${receptor.id}_ug_m3`),
    'percent_of_standard', 'verdict', 'ground_peak_ug_m3', 'area_above_level_m2',
  ];
  const empty = (value: number | null, format: (v: number) => number): string => (value === null ? '' : String(format(value)));
  const lines = [header.map(csvField).join(',')];
  for (const candidate of result.candidates) {
    lines.push(
      [
        String(candidate.rank), candidate.id, candidate.origin, String(degrees(candidate.lon)), String(degrees(candidate.lat)),
        String(metres(candidate.x_m)), String(metres(candidate.y_m)), String(pc(candidate.combined_ug_m3)), String(pc(candidate.highestPc_ug_m3)),
        candidate.highestReceptorId, ...candidate.receptorPc_ug_m3.map((value) => String(pc(value))),
        empty(candidate.percentOfStandard, percent), candidate.verdict ?? '', empty(candidate.groundPeak_ug_m3, pc),
        empty(candidate.areaAboveLevel_m2, (value) => roundSignificant(value, 2)),
      ].map(csvField).join(','),
    );
  }
  return lines.join(LINE_END) + LINE_END;
}

function candidateJson(candidate: RankedCandidate, result: SitingResult): Record<string, unknown> {
  return {
    rank: candidate.rank,
    id: candidate.id,
    origin: candidate.origin,
    lon: degrees(candidate.lon),
    lat: degrees(candidate.lat),
    x_m: metres(candidate.x_m),
    y_m: metres(candidate.y_m),
    combined_ug_m3: pc(candidate.combined_ug_m3),
    highestPc_ug_m3: pc(candidate.highestPc_ug_m3),
    highestReceptor: candidate.highestReceptorId,
    receptors: result.receptors.map((receptor, r) => ({
      id: receptor.id,
      pc_ug_m3: pc(candidate.receptorPc_ug_m3[r]),
      forwardPc_ug_m3: candidate.forwardReceptorPc_ug_m3 === null ? null : pc(candidate.forwardReceptorPc_ug_m3[r]),
    })),
    percentOfStandard: candidate.percentOfStandard === null ? null : percent(candidate.percentOfStandard),
    verdict: candidate.verdict,
    groundPeak_ug_m3: candidate.groundPeak_ug_m3 === null ? null : pc(candidate.groundPeak_ug_m3),
    areaAboveLevel_m2: candidate.areaAboveLevel_m2 === null ? null : roundSignificant(candidate.areaAboveLevel_m2, 2),
  };
}

/** siting.json: the whole result, rounded, with the caution, the limits and the notes. */
export function sitingJson(result: SitingResult, files: Record<string, string>): Record<string, unknown> {
  const { map, grid } = result;
  return {
    format: SITING_FORMAT,
    caution: SCREENING_CAUTION,
    limits: result.limits,
    scenario: result.scenarioName,
    pollutant: result.pollutant,
    mode: result.mode,
    weatherKind: result.weatherKind,
    statistic: result.statistic,
    map: {
      meaning: mapMeaning(result),
      combination: map.combination,
      units: 'ug/m3',
      grid: { nx: grid.nx, ny: grid.ny, spacing_m: grid.spacing_m, xWest_m: grid.xWest_m, ySouth_m: grid.ySouth_m, projection: grid.projection.definition },
      rasters: {
        combined: SITING_MAP_FILE,
        perReceptor: receptorRasters(result),
        crs: 'the site\'s WGS 84 UTM zone (EPSG code in each file), each pixel the map value of the grid column its centre falls in (nearest cell); nodata -9999 off the site and outside the grid',
      },
      maskedToSite: result.siteMask !== null,
      files,
    },
    stack: { ...result.stack, effectiveHeights_m: map.effectiveHeights_m.map((height) => roundDecimals(height, 1)) },
    receptors: result.receptors.map((receptor) => ({ ...receptor, x_m: metres(receptor.x_m), y_m: metres(receptor.y_m) })),
    standard: result.standard,
    level_ug_m3: result.level_ug_m3,
    best: {
      ...result.best,
      lon: degrees(result.best.lon),
      lat: degrees(result.best.lat),
      x_m: metres(result.best.x_m),
      y_m: metres(result.best.y_m),
      combined_ug_m3: pc(result.best.combined_ug_m3),
      receptorPc_ug_m3: result.best.receptorPc_ug_m3.map(pc),
    },
    sitePolygonSpacing_m: result.sampleSpacing_m,
    candidates: result.candidates.map((candidate) => candidateJson(candidate, result)),
    agreement: {
      forwardRuns: result.forwardRunCount,
      largestDifferenceFractionOfPeak: result.forwardAgreement === null ? null : roundSignificant(result.forwardAgreement, 2),
      meaning: 'largest |map - forward run| receptor PC over the forward-run candidates, as a fraction of the largest forward PC',
    },
    run: {
      mapSeconds: roundSignificant(result.mapSeconds, 3),
      adjointSolves: map.mode === 'grid' ? map.solves : 0,
      sweeps: map.sweeps,
      nearFieldPlans: map.nearFieldPlans,
      forwardSeconds: roundSignificant(result.forwardSeconds, 3),
      wallSeconds: roundSignificant(result.wallSeconds, 3),
    },
    notes: result.notes,
  };
}

function point(lonLat: [number, number], properties: Record<string, unknown>): Feature<Geometry, Record<string, unknown>> {
  return { type: 'Feature', geometry: { type: 'Point', coordinates: [degrees(lonLat[0]), degrees(lonLat[1])] }, properties };
}

/** The combined map's isopleth bands (siting.geojson's and the siting figure's), at the levels given or round 1-2-5 levels. */
export function sitingMapBands(result: SitingResult, levels_ug_m3?: number[]): FootprintCollection {
  const levels = levels_ug_m3 ?? defaultFootprintLevels(result.map.combined_ug_m3);
  return footprintBands(result.map.combined_ug_m3, result.grid, { levels_ug_m3: levels, scenarioName: result.scenarioName, statistic: result.statistic });
}

/**
 * siting.geojson: RFC 7946 FeatureCollection in WGS 84 lon/lat. Features carry `kind`: "map band" (an
 * isopleth band of the combined map, lower_ug_m3 included, upper_ug_m3 excluded or null at the top),
 * "best position", "candidate" (rank, id, combined_ug_m3, verdict), "receptor" and "site polygon".
 *
 * @param levels_ug_m3 the bands' levels (default: round 1-2-5 levels across the map's range)
 */
export function sitingGeoJson(result: SitingResult, levels_ug_m3?: number[]): Record<string, unknown> {
  const { grid } = result;
  const bands = sitingMapBands(result, levels_ug_m3);
  const features: Feature<Geometry, Record<string, unknown>>[] = bands.features.map((band) => ({ ...band, properties: { kind: 'map band', ...band.properties } }));
  const toLonLat = (x: number, y: number): [number, number] => grid.projection.toLonLat(x, y);
  if (result.siteRing_m !== null) {
    features.push({
      type: 'Feature',
      geometry: { type: 'Polygon', coordinates: [result.siteRing_m.map(([x, y]) => toLonLat(x, y).map(degrees))] },
      properties: { kind: 'site polygon' },
    });
  }
  for (const receptor of result.receptors) features.push(point(toLonLat(receptor.x_m, receptor.y_m), { kind: 'receptor', id: receptor.id, name: receptor.name }));
  for (const candidate of result.candidates) {
    features.push(point([candidate.lon, candidate.lat], { kind: 'candidate', rank: candidate.rank, id: candidate.id, combined_ug_m3: pc(candidate.combined_ug_m3), verdict: candidate.verdict }));
  }
  features.push(point([result.best.lon, result.best.lat], { kind: 'best position', within: result.best.within, combined_ug_m3: pc(result.best.combined_ug_m3) }));
  return {
    type: 'FeatureCollection',
    properties: {
      caution: SCREENING_CAUTION,
      limits: result.limits,
      scenario: result.scenarioName,
      meaning: mapMeaning(result),
      units: 'ug/m3',
      levels_ug_m3: bands.properties.levels_ug_m3,
    },
    features,
  };
}

export interface SitingFolderOptions {
  /** the map bands' levels [ug/m3] */
  levels_ug_m3?: number[];
  /** site latitude and longitude (the local projection's origin; the rasters' UTM zone is the grid's site) */
  site: { lat: number; lon: number };
  /** the scenario as sited: the report's checksum, the figure's UTM zone */
  scenario: Scenario;
  /** the command as typed, for the report's reproducibility block; default "plumeplan site SCENARIO" */
  command?: string;
  /** the siting's date in the report and figure; default now */
  runDate?: Date;
  /** 'quick' leaves out the rendered figure and report (siting-map.png, siting-report.pdf), as plumeplan run --quick does */
  outputs?: 'full' | 'quick';
  /** when it aborts during the writing, the files written so far are removed and an AbortError thrown */
  signal?: AbortSignal;
}

/**
 * Build the siting folder's files in memory: siting.json, candidates.csv, siting-map.tif, siting.geojson,
 * a siting-map-<receptor>.tif per receptor (up to MAX_RECEPTOR_RASTERS), the figure and report of
 * ./sitingReport.ts (siting-map.svg and siting-report.html; with full outputs also siting-map.png and
 * siting-report.pdf) and a footprint-<id>.geojson for
 * each candidate that kept its ground-level field. What `writeSitingFolder` writes and what the server
 * stores for a site job.
 *
 * @returns [file name, content] in the order written
 * @throws RangeError when the levels are invalid
 */
export async function buildSitingFiles(result: SitingResult, options: SitingFolderOptions): Promise<[string, string | Uint8Array][]> {
  const statistic = result.statistic === 'mean' ? 'long-term mean' : 'steady-weather';
  const raster = async (field: Float64Array, what: string): Promise<Uint8Array> => {
    // off the site: the writer's nodata value, which nearest-cell resampling carries through unchanged
    const masked = result.siteMask === null ? field : Float64Array.from(field, (value, column) => (result.siteMask?.[column] === 1 ? value : GEOTIFF_NODATA));
    const tif = await writeGroundGeoTiff(
      { grid: result.grid, footprint_ug_m3: masked, footprintStatistic: result.statistic, weatherKind: result.weatherKind },
      { subject: `Siting map: ${statistic} ${what} [ug/m3] if the stack stood at each pixel, nodata also off the site`, scenarioName: result.scenarioName },
    );
    return tif.bytes;
  };
  const tiff = await raster(result.map.combined_ug_m3, result.map.receptorWeights === null ? 'highest PC at the receptors' : 'weighted sum of receptor PCs');
  const perReceptor = receptorRasters(result);
  const receptorTiffs: [string, Uint8Array][] = [];
  for (const [r, receptor] of result.receptors.entries()) {
    const file = perReceptor[receptor.id];
    if (file !== undefined) receptorTiffs.push([file, await raster(result.map.perReceptor_ug_m3[r], `PC at ${receptor.id}`)]);
  }
  const geojson = sitingGeoJson(result, options.levels_ug_m3);
  const reportFiles = await buildSitingReportFiles({
    result,
    bands: sitingMapBands(result, options.levels_ug_m3),
    scenario: options.scenario,
    command: options.command,
    runDate: options.runDate,
    outputs: options.outputs,
  });
  const footprints: [string, string][] = [];
  for (const candidate of result.candidates) {
    if (candidate.groundLevel_ug_m3 === undefined) continue;
    const collection = footprintBands(candidate.groundLevel_ug_m3, result.grid, { scenarioName: `${result.scenarioName}: stack at candidate ${candidate.id}`, statistic: result.statistic });
    footprints.push([`footprint-${candidate.id.replace(/[^\w.-]/g, '_')}.geojson`, formatFootprint(collection)]);
  }
  const full = (options.outputs ?? 'full') === 'full';
  const files: Record<string, string> = {
    geotiff: SITING_MAP_FILE,
    geojson: SITING_GEOJSON_FILE,
    candidates: CANDIDATES_CSV_FILE,
    figure: SITING_MAP_SVG_FILE,
    ...(full ? { figurePng: SITING_MAP_PNG_FILE } : {}),
    report: SITING_REPORT_HTML_FILE,
    ...(full ? { reportPdf: SITING_REPORT_PDF_FILE } : {}),
  };
  return [
    [SITING_JSON_FILE, `${JSON.stringify(sitingJson(result, files), null, 2)}\n`],
    [CANDIDATES_CSV_FILE, candidatesCsv(result)],
    [SITING_MAP_FILE, tiff],
    [SITING_GEOJSON_FILE, `${JSON.stringify(geojson)}\n`],
    ...receptorTiffs,
    ...reportFiles,
    ...footprints,
  ];
}

/**
 * Write the siting folder (the files of `buildSitingFiles`).
 *
 * @returns the file names written, in order
 * @throws RangeError when the folder exists and is not a folder, or the levels are invalid
 */
export async function writeSitingFolder(directory: string, result: SitingResult, options: SitingFolderOptions): Promise<string[]> {
  // Everything is built before the disk is touched, so a failure leaves no half-written folder.
  const texts = await buildSitingFiles(result, options);
  const existing = await stat(directory).catch(() => null);
  if (existing !== null && !existing.isDirectory()) throw new RangeError(`siting folder ${directory}: exists and is not a folder; give a folder to write the results into`);
  await mkdir(directory, { recursive: true });
  // siting.json, the file that says what the folder holds, goes last: a folder without it is not a result
  const ordered = [...texts.slice(1), texts[0]];
  const written: string[] = [];
  const interrupted = async (): Promise<never> => {
    await Promise.all(written.map((file) => rm(file, { force: true })));
    const error = new Error('siting interrupted while writing; the files written were removed');
    error.name = 'AbortError';
    throw error;
  };
  for (const [name, content] of ordered) {
    if (options.signal?.aborted) await interrupted();
    const file = path.join(directory, name);
    written.push(file);
    await writeFile(file, content);
  }
  if (options.signal?.aborted) await interrupted();
  return texts.map(([name]) => name);
}
