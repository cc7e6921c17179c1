/**
 * The result folder of a run: summary.json, receptors.csv, footprint.geojson and any extra files the run
 * produced (a wind-rose picture, for instance), then the consultation pack: receptors-with-caution.csv,
 * ground.tif (the ground field as a GeoTIFF), map.svg and map.png (the site map figure), report.html and
 * report.pdf (the report), and one zip holding every file with a manifest of their SHA-256 checksums.
 *
 * `buildResultFiles` makes the first files in memory (text; the server stores them for a run),
 * `buildConsultationPack` the pack (text and bytes; the server can offer them as downloads), and
 * `writeResultFolder` writes both. `outputs: 'quick'` leaves out the rendered files (map.png and
 * report.pdf), the slowest to make; `'core'` the whole pack. The folder is created if it does not exist;
 * files of the same names are replaced.
 *
 * A reused folder holds only this run's files: each run also writes `.plumeplan-files.json`, the list of
 * the files it wrote, and the next run into the folder removes the files on that list that it does not
 * write again (a wind-rose picture left by an earlier series run, say). Only names on our own list are
 * ever removed, and only plain files directly in the folder: a file the user put there is never touched.
 */
import { lstat, mkdir, readFile, rm, stat, writeFile } from 'node:fs/promises';
import path from 'node:path';
import type { Scenario } from '../../scenarios/format/types.ts';
import type { ScenarioRunResult } from '../../solver/drivers/types.ts';
import { footprintBands, type FootprintCollection } from './footprint.ts';
import { buildReceptorsCsv } from './receptorsCsv.ts';
import { GROUND_LEVEL_HEIGHT_m } from '../../solver/drivers/steadyScenario.ts';
import { buildSummary, type ResultSummary } from './summary.ts';
import { windRoseSvg } from './windRoseSvg.ts';
import { levelsFromPercentages } from '../../solver/assessment/footprintAreas.ts';
import type { CrsRequest } from './crs.ts';
import { writeGroundGeoTiff } from './groundGeoTiff.ts';
import { renderMapSvg, type ContextLayer } from './map/mapSvg.ts';
import { renderSvgToPng } from './map/mapPng.ts';
import { runProvenance, type RunProvenance } from './provenance.ts';
import { buildReceptorsCautionCsv } from './receptorsCautionCsv.ts';
import { buildReportModel } from './report/reportModel.ts';
import { renderReportHtml } from './report/reportHtml.ts';
import { writeReportPdf } from './report/reportPdf.ts';
import { buildRunZip } from './runZip.ts';

export const SUMMARY_FILE = 'summary.json';
export const RECEPTORS_FILE = 'receptors.csv';
export const FOOTPRINT_FILE = 'footprint.geojson';
export const WIND_ROSE_FILE = 'windrose.svg';
export const RECEPTORS_CAUTION_FILE = 'receptors-with-caution.csv';
export const GROUND_GEOTIFF_FILE = 'ground.tif';
export const MAP_SVG_FILE = 'map.svg';
export const MAP_PNG_FILE = 'map.png';
export const REPORT_HTML_FILE = 'report.html';
export const REPORT_PDF_FILE = 'report.pdf';
export const RUN_ZIP_FILE = 'plumeplan-run.zip';

/**
 * Which files to make: 'full' every file; 'quick' all but the rendered ones (map.png, report.pdf), which
 * take the longest; 'core' only summary.json, receptors.csv, footprint.geojson and the wind rose.
 */
export type ResultOutputs = 'full' | 'quick' | 'core';

/** The list of the files the last run wrote into the folder (see the file comment). */
export const RESULT_FILES_LIST = '.plumeplan-files.json';
/** What the list says it is. */
const RESULT_FILES_FORMAT = 'plumeplan.result-files/1';

export interface ResultFolderOptions {
  /** footprint levels, positive and increasing [ug/m3]; default: round levels across the field's range */
  levels_ug_m3?: number[];
  /** how the levels were chosen, when as percentages of a standard (written into summary.json) */
  levelsBasis?: string;
  /** height of the ground-level field [m]; default 1.5 */
  groundLevelHeight_m?: number;
  /** which files to make; default 'full' */
  outputs?: ResultOutputs;
  /** CRS of ground.tif and the map figure; default the site's WGS 84 UTM zone */
  crs?: CrsRequest;
  /** the user's context layers, drawn on the map */
  contextLayers?: ContextLayer[];
  /** version, scenario checksum, run date and command; default: this version, now, "plumeplan run" */
  provenance?: RunProvenance;
}

/** One file of the consultation pack. */
export interface PackFileContent {
  name: string;
  data: string | Uint8Array;
}

export interface WrittenResultFolder {
  /** the folder, as given */
  directory: string;
  /** file names written, in the order written (the list of them, RESULT_FILES_LIST, is written last) */
  files: string[];
  /** files of an earlier run removed from the folder because this run does not write them */
  removed: string[];
  summary: ResultSummary;
  footprint: FootprintCollection;
}

/**
 * Write a run's result folder.
 *
 * @param directory folder to write into (created, with its parents, if missing)
 * @param scenario the parsed scenario
 * @param result what the run handed back
 * @param options footprint levels and ground-level height
 * @returns the folder, the file names and the summary and footprint as written
 * @throws RangeError when `directory` exists and is not a folder, or the levels are invalid
 * @example
 *   const written = await writeResultFolder('out/demo', scenario, await runScenario(scenario, {}));
 */
export async function writeResultFolder(
  directory: string,
  scenario: Scenario,
  result: ScenarioRunResult,
  options: ResultFolderOptions = {},
): Promise<WrittenResultFolder> {
  // Build everything before touching the disk, so a failure leaves no half-written folder.
  const built = buildResultFiles(scenario, result, options);
  const pack = (options.outputs ?? 'full') === 'core' ? [] : await buildConsultationPack(scenario, result, built, options);

  const existing = await stat(directory).catch(() => null);
  if (existing !== null && !existing.isDirectory()) {
    throw new RangeError(`result folder ${directory}: exists and is not a folder; give a folder to write the results into`);
  }
  await mkdir(directory, { recursive: true });
  const names = [...built.contents.map(([name]) => name), ...pack.map((file) => file.name)];
  const removed = await removeEarlierResultFiles(directory, names);
  for (const [name, text] of built.contents) await writeFile(path.join(directory, name), text, 'utf8');
  for (const file of pack) await writeFile(path.join(directory, file.name), file.data);
  await writeFile(
    path.join(directory, RESULT_FILES_LIST),
    `${JSON.stringify({ format: RESULT_FILES_FORMAT, note: 'written by plumeplan: the files of the last run into this folder', files: names }, null, 2)}\n`,
    'utf8',
  );
  return { directory, files: names, removed, summary: built.summary, footprint: built.footprint };
}

/**
 * Remove the files the last run listed in RESULT_FILES_LIST that this run will not write again: plain
 * files directly in the folder, by the names on that list only.
 * @returns the names removed
 */
async function removeEarlierResultFiles(directory: string, keep: readonly string[]): Promise<string[]> {
  let listed: unknown;
  try {
    listed = JSON.parse(await readFile(path.join(directory, RESULT_FILES_LIST), 'utf8'));
  } catch {
    return []; // no list (a new folder, or one from before lists were kept): nothing is ours to remove
  }
  const files = (listed as { format?: unknown; files?: unknown } | null)?.files;
  if ((listed as { format?: unknown } | null)?.format !== RESULT_FILES_FORMAT || !Array.isArray(files)) return [];
  const removed: string[] = [];
  for (const name of files) {
    // a bare file name only: nothing outside the folder, no sub-folders, not the list itself
    if (typeof name !== 'string' || name === '' || name !== path.basename(name) || name === '.' || name === '..') continue;
    if (name === RESULT_FILES_LIST || keep.includes(name)) continue;
    const target = path.join(directory, name);
    const found = await lstat(target).catch(() => null);
    if (found === null || !found.isFile()) continue;
    await rm(target);
    removed.push(name);
  }
  return removed;
}

/** The result folder's files as text, before anything is written. */
export interface BuiltResultFiles {
  /** [file name, text] in the order they are written */
  contents: [string, string][];
  summary: ResultSummary;
  footprint: FootprintCollection;
}

/**
 * Build the result folder's files in memory: what `writeResultFolder` writes, and what the server
 * stores for a run.
 *
 * @param scenario the parsed scenario
 * @param result what the run handed back
 * @param options footprint levels and ground-level height
 * @throws RangeError when the levels are invalid
 * @example const { contents } = buildResultFiles(scenario, result);
 */
export function buildResultFiles(scenario: Scenario, result: ScenarioRunResult, options: ResultFolderOptions = {}): BuiltResultFiles {
  const groundLevelHeight_m = options.groundLevelHeight_m ?? GROUND_LEVEL_HEIGHT_m;
  const footprint = footprintBands(result.footprint_ug_m3, result.grid, {
    levels_ug_m3: options.levels_ug_m3,
    scenarioName: scenario.name,
    statistic: result.footprintStatistic,
    height_m: groundLevelHeight_m,
    site: result.site ?? null,
  });
  const summary = buildSummary(scenario, result, {
    levels_ug_m3: footprint.properties.levels_ug_m3,
    levelsBasis: options.levelsBasis,
    groundLevelHeight_m,
  });
  const standardMaps = standardFootprints(scenario, result, groundLevelHeight_m);
  if (standardMaps.length > 0) {
    summary.standardMaps = standardMaps.map(({ name, file, levels }) => ({ standard: name, file, levels_ug_m3: levels }));
  }
  const receptorsCsv = buildReceptorsCsv(scenario, result);
  const contents: [string, string][] = [
    [SUMMARY_FILE, `${JSON.stringify(summary, null, 2)}\n`],
    [RECEPTORS_FILE, receptorsCsv],
    [FOOTPRINT_FILE, formatFootprint(footprint)],
    ...(result.windRose ? [[WIND_ROSE_FILE, windRoseSvg(result.windRose.table, { caption: result.windRose.caption })] as [string, string]] : []),
    ...standardMaps.map(({ file, collection }) => [file, formatFootprint(collection)] as [string, string]),
  ];
  return { contents, summary, footprint };
}

/** Levels of a standard's map as percentages of its limit [%]: 1 % and 10 % (the screen's thresholds), half, and the limit. */
export const STANDARD_MAP_PERCENTAGES = [1, 10, 50, 100] as const;

/**
 * A map of each standard's statistic on the ground (the annual mean, the percentile the allowed
 * exceedances imply, or the screening set's upper bound), as bands at 1, 10, 50 and 100 % of its limit.
 * Steady weather gets none: its hourly PC is the footprint itself.
 */
function standardFootprints(scenario: Scenario, result: ScenarioRunResult, height_m: number) {
  const verdictOf = new Map((result.verdicts?.standards ?? []).map((v) => [v.name, v]));
  const used = new Set<string>();
  return (result.standardFields ?? [])
    // one steady state's hourly PC is no standard's statistic (verdicts call it indicative): no map for it
    .filter((field) => field.ground_ug_m3 !== null && field.basis !== 'oneWeatherHour' && verdictOf.has(field.name))
    .map((field) => {
      const verdict = verdictOf.get(field.name)!;
      const levels = levelsFromPercentages(STANDARD_MAP_PERCENTAGES, verdict.limit_ug_m3);
      let slug = `standard-${field.name.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '')}`;
      for (let n = 2; used.has(slug); n++) slug = `${slug}-${n}`;
      used.add(slug);
      const collection = footprintBands(field.ground_ug_m3!, result.grid, {
        levels_ug_m3: levels,
        scenarioName: scenario.name,
        statistic: 'standard',
        standard: { name: field.name, limit_ug_m3: verdict.limit_ug_m3, basis: field.basis, levelsPercentOfLimit: [...STANDARD_MAP_PERCENTAGES] },
        height_m,
      });
      return { name: field.name, file: `${slug}.geojson`, levels, collection };
    });
}

/**
 * Make the consultation pack in memory: receptors-with-caution.csv, ground.tif, map.svg, map.png,
 * report.html, report.pdf and the run zip (which holds the core files too).
 *
 * @param scenario the parsed scenario
 * @param result what the run handed back
 * @param built the core files (buildResultFiles) the pack goes with
 * @param options outputs ('quick' leaves out map.png and report.pdf), CRS, context layers, provenance
 * @returns the pack's files, in the order they are listed and written
 * @throws RangeError for a CRS plumeplan does not know
 * @example const pack = await buildConsultationPack(scenario, result, buildResultFiles(scenario, result));
 */
export async function buildConsultationPack(
  scenario: Scenario,
  result: ScenarioRunResult,
  built: BuiltResultFiles,
  options: ResultFolderOptions = {},
): Promise<PackFileContent[]> {
  const groundLevelHeight_m = options.groundLevelHeight_m ?? GROUND_LEVEL_HEIGHT_m;
  const full = (options.outputs ?? 'full') === 'full';
  const provenance = options.provenance ?? runProvenance(scenario);
  const { summary, footprint } = built;
  const rose = built.contents.find(([name]) => name === WIND_ROSE_FILE)?.[1];
  const tif = await writeGroundGeoTiff(result, {
    crs: options.crs,
    scenarioName: scenario.name,
    pollutant: scenario.pollutant.name,
    height_m: groundLevelHeight_m,
    version: provenance.version,
    runDate: new Date(provenance.runDate),
  });
  const map = renderMapSvg(scenario, result, { crs: options.crs, footprint, contextLayers: options.contextLayers, provenance, groundLevelHeight_m });
  const report = buildReportModel({ scenario, result, summary, footprint, map, windRoseSvg: rose, provenance });
  const pack: PackFileContent[] = [
    { name: RECEPTORS_CAUTION_FILE, data: buildReceptorsCautionCsv(scenario, result, provenance) },
    { name: GROUND_GEOTIFF_FILE, data: tif.bytes },
    { name: MAP_SVG_FILE, data: map.svg },
  ];
  if (full) pack.push({ name: MAP_PNG_FILE, data: renderSvgToPng(map.svg).bytes });
  pack.push({ name: REPORT_HTML_FILE, data: renderReportHtml(report) });
  if (full) pack.push({ name: REPORT_PDF_FILE, data: await writeReportPdf(report) });
  const everything = [...built.contents.map(([name, data]) => ({ name, data })), ...pack];
  pack.push({ name: RUN_ZIP_FILE, data: buildRunZip(everything, scenario, provenance).bytes });
  return pack;
}

/**
 * footprint.geojson's text: the collection's properties indented for reading, then one feature per line
 * (a band's coordinates run to thousands of numbers, which would be unreadable one per line).
 */
export function formatFootprint(collection: Pick<FootprintCollection, 'properties'> & { features: readonly unknown[] } | { properties: object; features: readonly unknown[] }): string {
  const properties = JSON.stringify(collection.properties, null, 2).replaceAll('\n', '\n  ');
  const features = collection.features.map((feature) => `    ${JSON.stringify(feature)}`).join(',\n');
  return (
    '{\n' +
    `  "type": "FeatureCollection",\n` +
    `  "properties": ${properties},\n` +
    `  "features": [${features.length > 0 ? `\n${features}\n  ` : ''}]\n` +
    '}\n'
  );
}

