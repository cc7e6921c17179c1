/**
 * Read a finished run folder (what `plumeplan run` writes) back into the shape a comparison needs,
 * without solving anything again:
 * - the scenario as run, from the run zip's scenario.json (plumeplan-run.zip);
 * - the local grid, rebuilt from that scenario and checked against summary.json's grid;
 * - the ground field on the local grid, read from ground.tif: each local cell centre takes the value of
 *   the GeoTIFF pixel it falls in (nearest pixel). ground.tif was itself resampled (nearest) from the local
 *   grid, so a cell gets its own value wherever the two lattices line up, else a neighbour's: the field is
 *   as fine as one cell. This is said in the comparison's notes;
 * - receptor figures, verdicts, statistic and notes from summary.json (rounded as written there:
 *   concentrations to 3 significant figures).
 */
import { readFile, stat } from 'node:fs/promises';
import path from 'node:path';
import { unzipSync, strFromU8 } from 'fflate';
import { fromArrayBuffer } from 'geotiff';
import { parseScenario } from '../../scenarios/format/schema.ts';
import { RESULT_FORMAT, type Scenario } from '../../scenarios/format/types.ts';
import type { ScreeningVerdicts } from '../../solver/assessment/verdicts.ts';
import type { ReceptorColumn, ScenarioRunResult } from '../../solver/drivers/types.ts';
import { prepareScenarioGeometry } from '../../solver/grid/scenarioGeometry.ts';
import { lonLatConverter, resolveCrs } from './crs.ts';
import { SCENARIO_FILE } from './runZip.ts';
import type { ResultSummary } from './summary.ts';
import { GROUND_GEOTIFF_FILE, RUN_ZIP_FILE, SUMMARY_FILE } from './writeResultFolder.ts';

/** A run folder read back. */
export interface ReadRunFolder {
  scenario: Scenario;
  /** enough of a run's result for a comparison, its report and its figure */
  result: ScenarioRunResult;
  /** what reading it back means for the figures */
  notes: string[];
}

/** Keys of summary.json's receptors that are not figures. */
const RECEPTOR_PLACE_KEYS = new Set(['id', 'name', 'lat', 'lon', 'x_m', 'y_m', 'height_m']);

/**
 * Whether a path is a folder (a run folder) rather than a file (a scenario).
 *
 * @returns true for an existing folder
 */
export async function isFolder(candidate: string): Promise<boolean> {
  return (await stat(candidate).catch(() => null))?.isDirectory() === true;
}

/**
 * Read a run folder written by `plumeplan run` (full or --quick: it needs summary.json, ground.tif and
 * plumeplan-run.zip).
 *
 * @param directory the run folder
 * @returns the scenario as run, the result read back and notes
 * @throws RangeError naming the folder and the file when something is missing or does not match
 */
export async function readRunFolder(directory: string): Promise<ReadRunFolder> {
  const need = async (name: string): Promise<Buffer> => {
    try {
      return await readFile(path.join(directory, name));
    } catch {
      throw new RangeError(`run folder ${directory}: no readable ${name}; give a folder written by "plumeplan run" (without --quick's "core" outputs), or a scenario file`);
    }
  };
  let summary: ResultSummary;
  try {
    summary = JSON.parse((await need(SUMMARY_FILE)).toString('utf8')) as ResultSummary;
  } catch (error) {
    if (error instanceof RangeError) throw error;
    throw new RangeError(`run folder ${directory}: ${SUMMARY_FILE} is not JSON (${(error as Error).message})`);
  }
  if (summary.format !== RESULT_FORMAT) {
    throw new RangeError(`run folder ${directory}: ${SUMMARY_FILE} has format ${JSON.stringify(summary.format)}; this plumeplan reads ${RESULT_FORMAT}`);
  }

  let zipped: Record<string, Uint8Array>;
  try {
    zipped = unzipSync(new Uint8Array(await need(RUN_ZIP_FILE)), { filter: (file) => file.name === SCENARIO_FILE });
  } catch (error) {
    if (error instanceof RangeError) throw error;
    throw new RangeError(`run folder ${directory}: ${RUN_ZIP_FILE} is not a readable zip (${(error as Error).message})`);
  }
  if (zipped[SCENARIO_FILE] === undefined) throw new RangeError(`run folder ${directory}: ${RUN_ZIP_FILE} holds no ${SCENARIO_FILE}`);
  const parsed = parseScenario(JSON.parse(strFromU8(zipped[SCENARIO_FILE])));
  if (!parsed.ok) {
    throw new RangeError(`run folder ${directory}: the scenario in ${RUN_ZIP_FILE} is not valid (${parsed.issues.map((issue) => `${issue.path}: ${issue.message}`).join('; ')})`);
  }
  const scenario = parsed.scenario;

  const geometry = prepareScenarioGeometry(scenario);
  const { grid } = geometry;
  const written = summary.grid;
  if (written.nx !== grid.nx || written.ny !== grid.ny || written.spacing_m !== grid.spacing_m) {
    throw new RangeError(
      `run folder ${directory}: ${SUMMARY_FILE}'s grid (${written.nx} x ${written.ny} at ${written.spacing_m} m) is not the grid of the scenario in ` +
        `${RUN_ZIP_FILE} (${grid.nx} x ${grid.ny} at ${grid.spacing_m} m); the folder's files do not belong together`,
    );
  }

  const field = await groundFieldFromGeoTiff(await need(GROUND_GEOTIFF_FILE), grid, directory);

  const receptorColumns: ReceptorColumn[] = [];
  const first = summary.receptors[0];
  if (first !== undefined) {
    for (const key of Object.keys(first)) {
      if (RECEPTOR_PLACE_KEYS.has(key) || typeof first[key] !== 'number') continue;
      receptorColumns.push({ key, values: Float64Array.from(summary.receptors, (receptor) => Number(receptor[key])) } as ReceptorColumn);
    }
  }
  const result: ScenarioRunResult = {
    mode: summary.mode,
    weatherKind: summary.weatherKind,
    grid,
    sources: summary.sources.map((source) => ({ id: source.id, x_m: source.x_m, y_m: source.y_m, effectiveHeight_m: source.effectiveHeight_m ?? Number.NaN })),
    massBudget_g: summary.massBudget_g,
    steps: summary.run.steps,
    wallSeconds: summary.run.wallSeconds,
    footprint_ug_m3: field,
    footprintStatistic: summary.footprint.statistic,
    receptorColumns,
    notes: [...summary.notes],
    extraSummary: {},
    site: geometry.site,
    ...(summary.verdicts !== undefined ? { verdicts: summary.verdicts as ScreeningVerdicts } : {}),
  };
  return {
    scenario,
    result,
    notes: [
      `read back from the run folder ${directory} without solving again: the ground field from ${GROUND_GEOTIFF_FILE} (nearest pixel at each ` +
        `local cell centre, as fine as one cell), receptor figures and verdicts from ${SUMMARY_FILE} (rounded to 3 significant figures)`,
    ],
  };
}

/** GeoTIFF keys (OGC GeoTIFF 1.1): the projected and the geographic CRS codes. */
interface CrsKeys {
  ProjectedCSTypeGeoKey?: number;
  GeographicTypeGeoKey?: number;
}

/** The ground field on the local grid, each cell centre taking the ground.tif pixel it falls in. */
async function groundFieldFromGeoTiff(bytes: Buffer, grid: ScenarioRunResult['grid'], directory: string): Promise<Float64Array> {
  const tiff = await fromArrayBuffer(bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer);
  const image = await tiff.getImage();
  const keys = (image.getGeoKeys() ?? {}) as CrsKeys;
  const epsg = keys.ProjectedCSTypeGeoKey ?? keys.GeographicTypeGeoKey;
  if (epsg === undefined) throw new RangeError(`run folder ${directory}: ${GROUND_GEOTIFF_FILE} names no EPSG code`);
  const converter = lonLatConverter(resolveCrs(`EPSG:${epsg}`));
  const [originX, originY] = image.getOrigin();
  const [resolutionX, resolutionY] = image.getResolution();
  const width = image.getWidth();
  const height = image.getHeight();
  const nodata = image.getGDALNoData();
  const [band] = (await image.readRasters({ interleave: false })) as unknown as ArrayLike<number>[];
  const field = new Float64Array(grid.nx * grid.ny);
  for (let j = 0; j < grid.ny; j++) {
    for (let i = 0; i < grid.nx; i++) {
      const x_m = grid.xWest_m + (i + 0.5) * grid.spacing_m;
      const y_m = grid.ySouth_m + (j + 0.5) * grid.spacing_m;
      const [X, Y] = converter.forward(grid.projection.toLonLat(x_m, y_m));
      const column = Math.floor((X - originX) / resolutionX);
      const row = Math.floor((Y - originY) / resolutionY);
      if (column < 0 || column >= width || row < 0 || row >= height) continue;
      const value = band[row * width + column];
      field[i + grid.nx * j] = value === nodata || !Number.isFinite(value) ? 0 : value;
    }
  }
  return field;
}
