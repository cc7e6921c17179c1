/**
 * map.svg: the site map figure of a run, drawn by our own code as plain SVG text: the ground-level
 * isopleth bands, the sources, the receptors, the point of maximum impact, any context layers the user
 * brought, grid coordinates of the export CRS along the frame, a scale bar, a north arrow, a legend with
 * the units and the statistic, and the screening caution under the figure.
 *
 * The figure is drawn in the export CRS (the site's UTM zone unless the caller names another), the same
 * system as ground.tif, so the tick labels are coordinates a GIS officer can find. Grid north is up; the
 * north arrow points to true north, which differs from grid north by the meridian convergence.
 *
 * The look is plumeplan's own: a warm paper background, bands from pale straw to deep oxblood, stacks as
 * white diamonds, receptors as dark teal rings. Text is set in DejaVu Sans (shipped in ../fonts).
 */
import type { Feature, FeatureCollection, Geometry, Position } from 'geojson';
import type { Scenario } from '../../../scenarios/format/types.ts';
import type { ScenarioRunResult } from '../../../solver/drivers/types.ts';
import type { LocalGrid } from '../../../solver/grid/types.ts';
import { SCREENING_CAUTION } from '../caution.ts';
import { lonLatConverter, resolveCrs, siteUtmCrs, type CrsRequest, type ExportCrs } from '../crs.ts';
import { FIGURE_FONT_FAMILY } from '../fonts/fonts.ts';
import { footprintBands, type FootprintCollection } from '../footprint.ts';
import type { DifferenceCollection } from '../comparison.ts';
import type { RunProvenance } from '../provenance.ts';
import { findPeak } from '../summary.ts';
import { escapeXml, groupedInteger, num, roundStep, wrapText } from './svgText.ts';

/** Band fills from the lowest level to the highest (plumeplan's palette: straw, amber, terracotta, oxblood). */
export const BAND_PALETTE = ['#f1e9c6', '#e8d38f', '#dfb062', '#d08a45', '#b86437', '#93412f', '#672331'] as const;

/**
 * The difference figure's diverging scale (plumeplan's own): increases (B above A) from pale blush to deep
 * brick, decreases (B below A) from pale sea-glass to deep slate, each from the smallest level to the largest.
 */
export const INCREASE_PALETTE = ['#f7e1d7', '#eebda6', '#e09474', '#c9694a', '#a84532', '#7d2a23'] as const;
export const DECREASE_PALETTE = ['#dcebe8', '#b4d5d1', '#83b7b6', '#56929a', '#35707f', '#1f4c60'] as const;

/** Size of the figure in SVG user units (pixels at 1x). */
export const MAP_WIDTH = 1000;
export const MAP_HEIGHT = 790;

const FRAME = { left: 78, top: 78, size: 600 } as const;
const PANEL_LEFT = 712;
const PAPER = '#fbf8f1';
const INK = '#2b2622';
const RECEPTOR_COLOUR = '#1d5c63';
const CONTEXT_COLOUR = '#6f7a86';

/** A layer of the user's own (roads, the site boundary, houses) drawn thinly under the symbols. */
export interface ContextLayer {
  name: string;
  features: FeatureCollection | Feature[];
}

export interface MapFigureOptions {
  /** CRS the figure is drawn in; default the site's WGS 84 UTM zone */
  crs?: CrsRequest;
  /** the footprint as written (bands in lon/lat); default: drawn afresh at `levels_ug_m3` */
  footprint?: FootprintCollection;
  /** isopleth levels when no footprint is given [ug/m3] */
  levels_ug_m3?: number[];
  /** the user's context layers */
  contextLayers?: ContextLayer[];
  /** version, checksum and date, printed small under the caution */
  provenance?: RunProvenance;
  /** height of the ground-level field [m]; default 1.5 */
  groundLevelHeight_m?: number;
  /** figure title; default "Ground-level <pollutant> <statistic>" */
  title?: string;
  /** the line under the title; default the scenario's name */
  subtitle?: string;
  /**
   * Draw a comparison's difference (B - A on this run's grid) instead of the run's own bands: increases and
   * decreases on a diverging scale, a legend of the change in µg/m³, no point of maximum impact.
   */
  difference?: DifferenceMapBands;
}

/** What a difference figure draws (see ../comparisonFigure.ts). */
export interface DifferenceMapBands {
  /** difference.geojson's bands of |B - A|, each marked increase or decrease */
  collection: DifferenceCollection;
  /** largest increase and decrease over the grid [ug/m3] (the decrease as a negative number or zero) */
  largestIncrease_ug_m3: number;
  largestDecrease_ug_m3: number;
}

export interface MapFigure {
  svg: string;
  width: number;
  height: number;
  crs: ExportCrs;
  /** the map frame's extent in the CRS: west, south, east, north */
  extent: [number, number, number, number];
}

/**
 * Draw the site map figure of a run.
 *
 * @param scenario the scenario (sources, receptors, names)
 * @param result the run (ground field, grid, statistic)
 * @param options CRS, footprint or levels, context layers, provenance
 * @returns the SVG text and the frame's extent in the CRS
 * @example const { svg } = renderMapSvg(scenario, result, { footprint: written.footprint });
 */
export function renderMapSvg(scenario: Scenario, result: ScenarioRunResult, options: MapFigureOptions = {}): MapFigure {
  const crs = options.crs === undefined ? siteUtmCrs(scenario.site) : resolveCrs(options.crs);
  const converter = lonLatConverter(crs);
  const toCrs = (lon: number, lat: number): [number, number] => converter.forward([lon, lat]);
  const footprint =
    options.footprint ??
    footprintBands(result.footprint_ug_m3, result.grid, {
      levels_ug_m3: options.levels_ug_m3,
      scenarioName: scenario.name,
      statistic: result.footprintStatistic,
    });
  const height_m = options.groundLevelHeight_m ?? footprint.properties.height_m;
  const difference = options.difference;
  const extent = chooseExtent(scenario, result, difference?.collection ?? footprint, toCrs);
  const [west, south, east, north] = extent;
  const scale = FRAME.size / (east - west);
  const px = ([X, Y]: [number, number]): [number, number] => [FRAME.left + (X - west) * scale, FRAME.top + (north - Y) * scale];
  const project = (position: Position): [number, number] => px(toCrs(position[0], position[1]));

  const pollutant = scenario.pollutant.name;
  const statisticWords = result.footprintStatistic === 'mean' ? 'mean concentration' : 'concentration';
  const weatherWords = { steady: 'steady weather', hourly: 'hourly series, period mean', windRose: 'wind rose, frequency-weighted mean', screeningSet: 'screening weather set, highest hourly value' }[
    result.weatherKind
  ];
  const title = options.title ?? (difference !== undefined ? `Change in ground-level ${pollutant} ${statisticWords}, B − A` : `Ground-level ${pollutant} ${statisticWords}`);
  const subtitle = options.subtitle ?? scenario.name;

  const out: string[] = [];
  out.push(
    `<svg xmlns="http://www.w3.org/2000/svg" width="${MAP_WIDTH}" height="${MAP_HEIGHT}" viewBox="0 0 ${MAP_WIDTH} ${MAP_HEIGHT}" ` +
      `font-family="${FIGURE_FONT_FAMILY}" font-size="12" fill="${INK}">`,
    `<title>${escapeXml(`${title}: ${scenario.name}`)}</title>`,
    `<desc id="caution">${escapeXml(SCREENING_CAUTION)}</desc>`,
    `<rect width="${MAP_WIDTH}" height="${MAP_HEIGHT}" fill="#ffffff"/>`,
    `<text x="${FRAME.left}" y="32" font-size="19" font-weight="bold">${escapeXml(title)}</text>`,
    `<text x="${FRAME.left}" y="54" font-size="12.5" fill="#5a524b">${escapeXml(truncate(subtitle, 120))}</text>`,
    `<defs><clipPath id="frame-clip"><rect x="${FRAME.left}" y="${FRAME.top}" width="${FRAME.size}" height="${FRAME.size}"/></clipPath>`,
    `<pattern id="area-hatch" width="6" height="6" patternUnits="userSpaceOnUse" patternTransform="rotate(45)">` +
      `<line x1="0" y1="0" x2="0" y2="6" stroke="${INK}" stroke-width="1.1"/></pattern></defs>`,
    `<rect x="${FRAME.left}" y="${FRAME.top}" width="${FRAME.size}" height="${FRAME.size}" fill="${PAPER}"/>`,
  );

  // Everything geographic is clipped to the frame.
  out.push('<g clip-path="url(#frame-clip)">');
  out.push(...(difference !== undefined ? differencePaths(difference.collection, project) : bandPaths(footprint, project)));
  out.push(...graticule(extent, px));
  for (const layer of options.contextLayers ?? []) out.push(...contextPaths(layer, project));
  out.push(...gridOutline(result.grid, toCrs, px));
  out.push(...siteBoundaryPath(scenario, project));
  out.push(...areaSourcePaths(scenario, project));
  out.push(...pointSourceSymbols(scenario, project));
  if (difference === undefined) out.push(...peakSymbol(result, project));
  out.push(...receptorSymbols(scenario, project));
  out.push('</g>');
  out.push(`<rect x="${FRAME.left}" y="${FRAME.top}" width="${FRAME.size}" height="${FRAME.size}" fill="none" stroke="${INK}" stroke-width="1.2"/>`);
  out.push(...tickLabels(extent, px, crs));
  out.push(...scaleBar(extent, scale, converter, result.grid));
  out.push(...northArrow(extent, converter));
  const legendWords = { pollutant, statisticWords, weatherWords, height_m, contextLayers: options.contextLayers ?? [] };
  out.push(...(difference !== undefined ? differenceLegend(difference, scenario, legendWords) : legend(footprint, scenario, result, legendWords)));
  out.push(...cautionBlock(crs, options.provenance));
  out.push('</svg>');
  return { svg: `${out.join('\n')}\n`, width: MAP_WIDTH, height: MAP_HEIGHT, crs, extent };
}

function truncate(text: string, length: number): string {
  return text.length <= length ? text : `${text.slice(0, length - 1)}…`;
}

/**
 * The frame's extent: the lowest band, the sources and the receptors with a margin, squared, and kept
 * inside the modelled grid (nothing is drawn where nothing was computed). No bands: the whole grid.
 */
function chooseExtent(
  scenario: Scenario,
  result: ScenarioRunResult,
  footprint: { features: readonly { geometry: Geometry }[] },
  toCrs: (lon: number, lat: number) => [number, number],
): [number, number, number, number] {
  const grid = result.grid;
  const gridCorners = [
    [grid.xWest_m, grid.ySouth_m],
    [grid.xWest_m + grid.nx * grid.spacing_m, grid.ySouth_m],
    [grid.xWest_m, grid.ySouth_m + grid.ny * grid.spacing_m],
    [grid.xWest_m + grid.nx * grid.spacing_m, grid.ySouth_m + grid.ny * grid.spacing_m],
  ].map(([x, y]) => toCrs(...grid.projection.toLonLat(x, y)));
  const gridBox = boxOf(gridCorners);
  const points: [number, number][] = [];
  for (const feature of footprint.features) {
    for (const ring of ringsOf(feature.geometry)) for (const position of ring) points.push(toCrs(position[0], position[1]));
  }
  for (const source of scenario.sources) {
    if (source.kind === 'point') points.push(toCrs(source.lon, source.lat));
    else for (const [lon, lat] of source.polygon) points.push(toCrs(lon, lat));
  }
  for (const receptor of scenario.receptors) points.push(toCrs(receptor.lon, receptor.lat));
  if (footprint.features.length === 0 && points.length < 2) return square(gridBox, gridBox);
  const box = boxOf(points);
  const span = Math.max(box[2] - box[0], box[3] - box[1], 10 * grid.spacing_m);
  const margin = 0.08 * span;
  return square([box[0] - margin, box[1] - margin, box[2] + margin, box[3] + margin], gridBox);
}

function boxOf(points: [number, number][]): [number, number, number, number] {
  let [west, south, east, north] = [Infinity, Infinity, -Infinity, -Infinity];
  for (const [X, Y] of points) {
    west = Math.min(west, X);
    east = Math.max(east, X);
    south = Math.min(south, Y);
    north = Math.max(north, Y);
  }
  return [west, south, east, north];
}

/** Grow a box to a square about its centre, then slide (and if need be shrink) it inside `limit`. */
function square(box: [number, number, number, number], limit: [number, number, number, number]): [number, number, number, number] {
  const side = Math.min(Math.max(box[2] - box[0], box[3] - box[1]), limit[2] - limit[0], limit[3] - limit[1]);
  let cx = (box[0] + box[2]) / 2;
  let cy = (box[1] + box[3]) / 2;
  cx = Math.min(Math.max(cx, limit[0] + side / 2), limit[2] - side / 2);
  cy = Math.min(Math.max(cy, limit[1] + side / 2), limit[3] - side / 2);
  return [cx - side / 2, cy - side / 2, cx + side / 2, cy + side / 2];
}

function ringsOf(geometry: Geometry): Position[][] {
  switch (geometry.type) {
    case 'Polygon':
      return geometry.coordinates;
    case 'MultiPolygon':
      return geometry.coordinates.flat();
    case 'LineString':
      return [geometry.coordinates];
    case 'MultiLineString':
      return geometry.coordinates;
    default:
      return [];
  }
}

function pathOfRings(rings: Position[][], project: (p: Position) => [number, number], close: boolean): string {
  return rings
    .map((ring) => ring.map((position, index) => `${index === 0 ? 'M' : 'L'}${num(project(position)[0])} ${num(project(position)[1])}`).join('') + (close ? 'Z' : ''))
    .join('');
}

/** Fill colour of band k of n: spread over the palette so the top band is always the darkest. */
export function bandColour(k: number, n: number): string {
  if (n <= 1) return BAND_PALETTE[BAND_PALETTE.length - 1];
  const offset = Math.max(0, BAND_PALETTE.length - n);
  const index = n >= BAND_PALETTE.length ? Math.round((k * (BAND_PALETTE.length - 1)) / (n - 1)) : offset + k;
  return BAND_PALETTE[index];
}

function bandPaths(footprint: FootprintCollection, project: (p: Position) => [number, number]): string[] {
  const levels = footprint.properties.levels_ug_m3;
  return footprint.features.map((feature) => {
    const k = levels.indexOf(feature.properties.lower_ug_m3);
    const d = pathOfRings(ringsOf(feature.geometry), project, true);
    return (
      `<path class="band" data-lower-ug-m3="${feature.properties.lower_ug_m3}" data-upper-ug-m3="${feature.properties.upper_ug_m3 ?? ''}" ` +
      `d="${d}" fill="${bandColour(k, levels.length)}" fill-rule="evenodd" stroke="#7a5a48" stroke-width="0.5" stroke-opacity="0.6"/>`
    );
  });
}

function graticule(extent: [number, number, number, number], px: (p: [number, number]) => [number, number]): string[] {
  const [west, south, east, north] = extent;
  const step = roundStep(east - west, 7);
  const lines: string[] = [];
  for (let X = Math.ceil(west / step) * step; X <= east; X += step) {
    const [x] = px([X, north]);
    lines.push(`<line x1="${num(x)}" y1="${FRAME.top}" x2="${num(x)}" y2="${FRAME.top + FRAME.size}"/>`);
  }
  for (let Y = Math.ceil(south / step) * step; Y <= north; Y += step) {
    const [, y] = px([west, Y]);
    lines.push(`<line x1="${FRAME.left}" y1="${num(y)}" x2="${FRAME.left + FRAME.size}" y2="${num(y)}"/>`);
  }
  return [`<g class="graticule" stroke="#8c8379" stroke-width="0.5" stroke-dasharray="2 3" stroke-opacity="0.7">`, ...lines, '</g>'];
}

function tickLabels(extent: [number, number, number, number], px: (p: [number, number]) => [number, number], crs: ExportCrs): string[] {
  const [west, south, east, north] = extent;
  const step = roundStep(east - west, 7);
  const label = (value: number): string => (crs.geographic ? value.toFixed(Math.max(0, -Math.floor(Math.log10(step)))) : groupedInteger(value));
  const out = ['<g class="ticks" font-size="10" fill="#4a433d">'];
  // Labels within 28 px of a corner would run into the other axis's labels; leave those out.
  const clearOfCorners = (offset: number): boolean => offset > 28 && offset < FRAME.size - 28;
  for (let X = Math.ceil(west / step) * step; X <= east; X += step) {
    const [x] = px([X, north]);
    if (!clearOfCorners(x - FRAME.left)) continue;
    out.push(`<text x="${num(x)}" y="${FRAME.top + FRAME.size + 14}" text-anchor="middle">${label(X)}</text>`);
  }
  for (let Y = Math.ceil(south / step) * step; Y <= north; Y += step) {
    const [, y] = px([west, Y]);
    if (!clearOfCorners(y - FRAME.top)) continue;
    out.push(`<text x="${FRAME.left - 6}" y="${num(y)}" text-anchor="middle" transform="rotate(-90 ${FRAME.left - 6} ${num(y)})">${label(Y)}</text>`);
  }
  const axisWords = crs.geographic ? 'longitude / latitude [deg]' : 'easting / northing [m]';
  out.push(`<text x="${FRAME.left + FRAME.size}" y="${FRAME.top + FRAME.size + 30}" text-anchor="end">${escapeXml(`${crs.name} (EPSG:${crs.epsg}), ${axisWords}`)}</text>`);
  out.push('</g>');
  return out;
}

function contextPaths(layer: ContextLayer, project: (p: Position) => [number, number]): string[] {
  const features = Array.isArray(layer.features) ? layer.features : layer.features.features;
  const out = [`<g class="context" data-layer="${escapeXml(layer.name)}" stroke="${CONTEXT_COLOUR}" stroke-width="1" fill="none">`];
  for (const feature of features) {
    const geometry = feature.geometry;
    if (geometry === null) continue;
    if (geometry.type === 'Point' || geometry.type === 'MultiPoint') {
      const points = geometry.type === 'Point' ? [geometry.coordinates] : geometry.coordinates;
      for (const point of points) {
        const [x, y] = project(point);
        out.push(`<rect x="${num(x - 2.5)}" y="${num(y - 2.5)}" width="5" height="5" fill="${CONTEXT_COLOUR}" stroke="none"/>`);
      }
    } else {
      const closed = geometry.type === 'Polygon' || geometry.type === 'MultiPolygon';
      out.push(`<path d="${pathOfRings(ringsOf(geometry), project, closed)}"${closed ? ' fill="#6f7a86" fill-opacity="0.08"' : ''}/>`);
    }
  }
  out.push('</g>');
  return out;
}

/** The edge of the modelled grid, where it falls inside the frame. */
function gridOutline(grid: LocalGrid, toCrs: (lon: number, lat: number) => [number, number], px: (p: [number, number]) => [number, number]): string[] {
  const xEast = grid.xWest_m + grid.nx * grid.spacing_m;
  const yNorth = grid.ySouth_m + grid.ny * grid.spacing_m;
  const ring: [number, number][] = [];
  const samples = 8;
  const corners: [number, number][] = [[grid.xWest_m, grid.ySouth_m], [xEast, grid.ySouth_m], [xEast, yNorth], [grid.xWest_m, yNorth]];
  corners.forEach((corner, index) => {
    const next = corners[(index + 1) % 4];
    for (let s = 0; s < samples; s += 1) {
      const t = s / samples;
      ring.push([corner[0] + t * (next[0] - corner[0]), corner[1] + t * (next[1] - corner[1])]);
    }
  });
  const d = ring.map(([x, y], index) => {
    const [sx, sy] = px(toCrs(...grid.projection.toLonLat(x, y)));
    return `${index === 0 ? 'M' : 'L'}${num(sx)} ${num(sy)}`;
  });
  return [`<path class="grid-edge" d="${d.join('')}Z" fill="none" stroke="#8c8379" stroke-width="1.5" stroke-dasharray="8 4"/>`];
}

/** The site's boundary (the fence), when the scenario gives one: peaks are looked for outside it. */
function siteBoundaryPath(scenario: Scenario, project: (p: Position) => [number, number]): string[] {
  const boundary = scenario.site.boundary;
  if (boundary === undefined) return [];
  return [`<path class="site-boundary" d="${pathOfRings([boundary], project, true)}" fill="none" stroke="${INK}" stroke-width="1.6" stroke-dasharray="2 3"/>`];
}

function areaSourcePaths(scenario: Scenario, project: (p: Position) => [number, number]): string[] {
  return scenario.sources
    .filter((source) => source.kind === 'area')
    .map(
      (source) =>
        `<path class="area-source" data-id="${escapeXml(source.id)}" d="${pathOfRings([source.polygon], project, true)}" ` +
        `fill="url(#area-hatch)" stroke="${INK}" stroke-width="1.4"/>`,
    );
}

function diamond(x: number, y: number, r: number): string {
  return `M${num(x)} ${num(y - r)}L${num(x + r)} ${num(y)}L${num(x)} ${num(y + r)}L${num(x - r)} ${num(y)}Z`;
}

function pointSourceSymbols(scenario: Scenario, project: (p: Position) => [number, number]): string[] {
  return scenario.sources
    .filter((source) => source.kind === 'point')
    .map((source) => {
      const [x, y] = project([source.lon, source.lat]);
      return (
        `<path class="point-source" data-id="${escapeXml(source.id)}" d="${diamond(x, y, 7)}" fill="#ffffff" stroke="${INK}" stroke-width="2"/>` +
        `<circle cx="${num(x)}" cy="${num(y)}" r="1.8" fill="${INK}"/>`
      );
    });
}

function peakSymbol(result: ScenarioRunResult, project: (p: Position) => [number, number]): string[] {
  const peak = findPeak(result);
  if (!(peak.concentration_ug_m3 > 0)) return [];
  const [x, y] = project([peak.lon, peak.lat]);
  return [
    `<g class="peak" data-concentration-ug-m3="${peak.concentration_ug_m3}" stroke="${INK}" stroke-width="1.6" fill="none">` +
      `<circle cx="${num(x)}" cy="${num(y)}" r="6"/><path d="M${num(x - 10)} ${num(y)}H${num(x - 3)}M${num(x + 3)} ${num(y)}H${num(x + 10)}M${num(x)} ${num(y - 10)}V${num(y - 3)}M${num(x)} ${num(y + 3)}V${num(y + 10)}"/></g>`,
  ];
}

function receptorSymbols(scenario: Scenario, project: (p: Position) => [number, number]): string[] {
  return scenario.receptors.map((receptor) => {
    const [x, y] = project([receptor.lon, receptor.lat]);
    return (
      `<g class="receptor" data-id="${escapeXml(receptor.id)}">` +
      `<circle cx="${num(x)}" cy="${num(y)}" r="5" fill="#ffffff" stroke="${RECEPTOR_COLOUR}" stroke-width="2.4"/>` +
      // The white halo is a text of its own under the label (paint-order is not drawn by every renderer).
      `<text x="${num(x + 9)}" y="${num(y + 4)}" font-size="11" fill="#ffffff" stroke="#ffffff" stroke-width="3" stroke-linejoin="round">${escapeXml(receptor.id)}</text>` +
      `<text x="${num(x + 9)}" y="${num(y + 4)}" font-size="11" fill="${RECEPTOR_COLOUR}">${escapeXml(receptor.id)}</text></g>`
    );
  });
}

/**
 * A scale bar of a round ground distance, bottom left inside the frame. Ground metres per CRS unit are
 * measured at the frame's centre through the local projection, so the bar is right in any CRS.
 */
function scaleBar(
  extent: [number, number, number, number],
  scale: number,
  converter: ReturnType<typeof lonLatConverter>,
  grid: LocalGrid,
): string[] {
  const [west, south, east, north] = extent;
  const cx = (west + east) / 2;
  const cy = (south + north) / 2;
  const unit = (east - west) / 100;
  const a = grid.projection.toLocal(...converter.inverse([cx, cy]));
  const b = grid.projection.toLocal(...converter.inverse([cx + unit, cy]));
  const metresPerUnit = Math.hypot(b[0] - a[0], b[1] - a[1]) / unit;
  const pxPerMetre = scale / metresPerUnit;
  const length_m = roundStep((FRAME.size * 0.3) / pxPerMetre, 1);
  const length_px = length_m * pxPerMetre;
  const x0 = FRAME.left + 16;
  const y0 = FRAME.top + FRAME.size - 22;
  const half = length_px / 2;
  const words = length_m >= 1000 ? `${num(length_m / 1000, 2)} km` : `${num(length_m, 0)} m`;
  return [
    `<g class="scale-bar" data-length-m="${length_m}">`,
    `<rect x="${num(x0 - 8)}" y="${num(y0 - 20)}" width="${num(length_px + 16)}" height="36" fill="#ffffff" fill-opacity="0.85" rx="3"/>`,
    `<rect x="${num(x0)}" y="${num(y0)}" width="${num(half)}" height="6" fill="${INK}"/>`,
    `<rect x="${num(x0 + half)}" y="${num(y0)}" width="${num(half)}" height="6" fill="#ffffff" stroke="${INK}" stroke-width="1"/>`,
    `<text x="${num(x0)}" y="${num(y0 - 5)}" font-size="10">0</text>`,
    `<text x="${num(x0 + length_px)}" y="${num(y0 - 5)}" font-size="10" text-anchor="end">${words}</text>`,
    '</g>',
  ];
}

/** True north at the frame's centre, as an angle from grid north (up), clockwise, in degrees. */
export function trueNorthAngle_deg(extent: [number, number, number, number], converter: ReturnType<typeof lonLatConverter>): number {
  const cx = (extent[0] + extent[2]) / 2;
  const cy = (extent[1] + extent[3]) / 2;
  const [lon, lat] = converter.inverse([cx, cy]);
  const [X2, Y2] = converter.forward([lon, lat + 0.01]);
  return (Math.atan2(X2 - cx, Y2 - cy) * 180) / Math.PI;
}

function northArrow(extent: [number, number, number, number], converter: ReturnType<typeof lonLatConverter>): string[] {
  const angle = trueNorthAngle_deg(extent, converter);
  const x = FRAME.left + FRAME.size - 34;
  const y = FRAME.top + 40;
  return [
    `<g class="north-arrow" data-true-north-deg="${num(angle, 2)}">`,
    `<circle cx="${x}" cy="${y}" r="24" fill="#ffffff" fill-opacity="0.85" stroke="#8c8379" stroke-width="0.8"/>`,
    `<g transform="rotate(${num(angle, 2)} ${x} ${y})">`,
    `<path d="M${x} ${y - 18}L${x + 7} ${y + 10}L${x} ${y + 4}Z" fill="${INK}"/>`,
    `<path d="M${x} ${y - 18}L${x - 7} ${y + 10}L${x} ${y + 4}Z" fill="#ffffff" stroke="${INK}" stroke-width="1"/>`,
    '</g>',
    `<text x="${x}" y="${y + 37}" font-size="10" text-anchor="middle" font-weight="bold">N</text>`,
    '</g>',
  ];
}

function legend(
  footprint: FootprintCollection,
  scenario: Scenario,
  result: ScenarioRunResult,
  words: { pollutant: string; statisticWords: string; weatherWords: string; height_m: number; contextLayers: ContextLayer[] },
): string[] {
  const out = [`<g class="legend" transform="translate(${PANEL_LEFT} ${FRAME.top})">`];
  let y = 8;
  out.push(`<text x="0" y="${y}" font-size="13" font-weight="bold">${escapeXml(`${words.pollutant} ${words.statisticWords}`)}</text>`);
  y += 17;
  out.push(`<text x="0" y="${y}" font-size="11" fill="#5a524b">µg/m³ at ${num(words.height_m, 1)} m above ground</text>`);
  y += 15;
  out.push(`<text x="0" y="${y}" font-size="11" fill="#5a524b">${escapeXml(words.weatherWords)}</text>`);
  y += 14;
  const levels = footprint.properties.levels_ug_m3;
  const drawn = new Set(footprint.features.map((feature) => feature.properties.lower_ug_m3));
  if (levels.length === 0) {
    y += 16;
    out.push(`<text x="0" y="${y}" font-size="11">no bands: the field is zero or flat</text>`);
  }
  for (let k = levels.length - 1; k >= 0; k -= 1) {
    y += 22;
    const upper = k + 1 < levels.length ? levels[k + 1] : null;
    const label = upper === null ? `${levels[k]} and above` : `${levels[k]} to ${upper}`;
    out.push(
      `<rect class="legend-band" x="0" y="${y - 13}" width="30" height="17" fill="${bandColour(k, levels.length)}" stroke="#7a5a48" stroke-width="0.6"/>`,
      `<text x="40" y="${y}" font-size="12">${escapeXml(label)}${drawn.has(levels[k]) ? '' : ' (not reached)'}</text>`,
    );
  }
  y += 20;
  const peak = findPeak(result);
  const offSite = scenario.site.boundary !== undefined;
  out.push(`<text x="0" y="${y}" font-size="11" fill="#5a524b">${offSite ? 'highest off the site' : 'ground-level maximum'} ${peak.concentration_ug_m3} µg/m³</text>`);
  if (peak.onSite !== undefined) {
    y += 14;
    out.push(`<text x="0" y="${y}" font-size="11" fill="#5a524b">highest on the site ${peak.onSite.concentration_ug_m3} µg/m³</text>`);
  }
  y += 26;
  out.push(`<line x1="0" y1="${y - 12}" x2="250" y2="${y - 12}" stroke="#d8d0c4"/>`);
  const symbol = (drawing: string, text: string): void => {
    y += 22;
    out.push(drawing.replaceAll('Y0', String(y - 4)), `<text x="40" y="${y}" font-size="12">${escapeXml(text)}</text>`);
  };
  if (scenario.sources.some((source) => source.kind === 'point')) {
    symbol(`<path d="${diamond(15, 0, 7)}" transform="translate(0 Y0)" fill="#ffffff" stroke="${INK}" stroke-width="2"/>`, 'stack (point source)');
  }
  if (scenario.sources.some((source) => source.kind === 'area')) {
    symbol(`<rect x="4" y="-7" width="22" height="14" transform="translate(0 Y0)" fill="url(#area-hatch)" stroke="${INK}" stroke-width="1.4"/>`, 'area source');
  }
  if (scenario.receptors.length > 0) {
    symbol(`<circle cx="15" cy="Y0" r="5" fill="#ffffff" stroke="${RECEPTOR_COLOUR}" stroke-width="2.4"/>`, 'receptor (labelled by id)');
  }
  symbol(
    `<g transform="translate(15 Y0)" stroke="${INK}" stroke-width="1.6" fill="none"><circle r="6"/><path d="M-10 0H-3M3 0H10M0 -10V-3M0 3V10"/></g>`,
    scenario.site.boundary !== undefined ? 'maximum impact off the site' : 'point of maximum impact',
  );
  if (scenario.site.boundary !== undefined) {
    symbol(`<rect x="4" y="-7" width="22" height="14" transform="translate(0 Y0)" fill="none" stroke="${INK}" stroke-width="1.6" stroke-dasharray="2 3"/>`, 'site boundary');
  }
  symbol(`<line x1="2" y1="Y0" x2="28" y2="Y0" stroke="#8c8379" stroke-width="1.5" stroke-dasharray="8 4"/>`, 'edge of the modelled grid');
  for (const layer of words.contextLayers) {
    symbol(`<line x1="2" y1="Y0" x2="28" y2="Y0" stroke="${CONTEXT_COLOUR}" stroke-width="1"/>`, truncate(layer.name, 30));
  }
  const weather = scenario.weather;
  if (weather.kind === 'steady') {
    y += 34;
    const angle = weather.windFrom_deg;
    out.push(
      `<g class="wind" data-wind-from-deg="${angle}" transform="translate(15 ${y - 4}) rotate(${angle})">` +
        `<path d="M0 -13V11M-5 5L0 12L5 5" stroke="${INK}" stroke-width="1.8" fill="none"/></g>`,
      `<text x="40" y="${y - 6}" font-size="12">wind from ${num(angle, 0)}°, ${num(weather.windSpeed_m_s, 1)} m/s</text>`,
      `<text x="40" y="${y + 9}" font-size="11" fill="#5a524b">stability ${escapeXml(weather.stability ?? 'derived')}, at ${num(weather.anemometerHeight_m, 0)} m</text>`,
    );
  }
  out.push('</g>');
  return out;
}

function cautionBlock(crs: ExportCrs, provenance: RunProvenance | undefined): string[] {
  const top = FRAME.top + FRAME.size + 52;
  const width = MAP_WIDTH - 2 * 40;
  const lines = wrapText(SCREENING_CAUTION, width - 12, 11.5);
  const out = [
    `<g class="caution">`,
    `<rect x="40" y="${top - 16}" width="${width}" height="${lines.length * 15 + 12}" fill="#fff4e0" stroke="#c9a66b" stroke-width="1" rx="3"/>`,
  ];
  lines.forEach((line, index) => {
    out.push(`<text x="48" y="${top + index * 15}" font-size="11.5">${escapeXml(line)}</text>`);
  });
  out.push('</g>');
  if (provenance !== undefined) {
    const footnote =
      `plumeplan ${provenance.version} · run ${provenance.runDate} · scenario SHA-256 ${provenance.scenarioSha256.slice(0, 16)}… · ` +
      `drawn in EPSG:${crs.epsg}`;
    out.push(`<text class="provenance" x="40" y="${MAP_HEIGHT - 8}" font-size="9.5" fill="#6b6259">${escapeXml(footnote)}</text>`);
  }
  return out;
}

/** Fill of level k of n on one side of the diverging scale: the largest level always the deepest colour. */
export function differenceColour(change: 'increase' | 'decrease', k: number, n: number): string {
  const palette = change === 'increase' ? INCREASE_PALETTE : DECREASE_PALETTE;
  if (n <= 1) return palette[palette.length - 1];
  const index = n >= palette.length ? Math.round((k * (palette.length - 1)) / (n - 1)) : palette.length - n + k;
  return palette[index];
}

function differencePaths(collection: DifferenceCollection, project: (p: Position) => [number, number]): string[] {
  const levels = collection.properties.levels_ug_m3;
  return collection.features.map((feature) => {
    const { change, lower_ug_m3, upper_ug_m3 } = feature.properties;
    const k = levels.indexOf(lower_ug_m3);
    return (
      `<path class="difference-band" data-change="${change}" data-lower-ug-m3="${lower_ug_m3}" data-upper-ug-m3="${upper_ug_m3 ?? ''}" ` +
      `d="${pathOfRings(ringsOf(feature.geometry), project, true)}" fill="${differenceColour(change, k, levels.length)}" fill-rule="evenodd" ` +
      `stroke="#6b625a" stroke-width="0.5" stroke-opacity="0.6"/>`
    );
  });
}

/** The difference figure's legend: the change in µg/m³ on the diverging scale, largest increase on top. */
function differenceLegend(
  difference: DifferenceMapBands,
  scenario: Scenario,
  words: { pollutant: string; statisticWords: string; weatherWords: string; height_m: number; contextLayers: ContextLayer[] },
): string[] {
  const out = [`<g class="legend difference-legend" transform="translate(${PANEL_LEFT} ${FRAME.top})">`];
  let y = 8;
  out.push(`<text x="0" y="${y}" font-size="13" font-weight="bold">${escapeXml(`Change in ${words.pollutant}, B − A`)}</text>`);
  y += 17;
  out.push(`<text x="0" y="${y}" font-size="11" fill="#5a524b">µg/m³ at ${num(words.height_m, 1)} m above ground</text>`);
  y += 15;
  out.push(`<text x="0" y="${y}" font-size="11" fill="#5a524b">${escapeXml(`${words.statisticWords}, on A's grid`)}</text>`);
  y += 14;
  const levels = difference.collection.properties.levels_ug_m3;
  const drawn = new Set(difference.collection.features.map((feature) => `${feature.properties.change} ${feature.properties.lower_ug_m3}`));
  if (levels.length === 0) {
    y += 16;
    out.push(`<text x="0" y="${y}" font-size="11">no bands: B equals A everywhere</text>`);
  }
  const entry = (change: 'increase' | 'decrease', k: number): void => {
    y += 22;
    const upper = k + 1 < levels.length ? levels[k + 1] : null;
    const sign = change === 'increase' ? '+' : '−';
    const label = upper === null ? `${sign}${levels[k]} and beyond` : `${sign}${levels[k]} to ${sign}${upper}`;
    out.push(
      `<rect class="legend-band" data-change="${change}" x="0" y="${y - 13}" width="30" height="17" fill="${differenceColour(change, k, levels.length)}" stroke="#6b625a" stroke-width="0.6"/>`,
      `<text x="40" y="${y}" font-size="12">${escapeXml(label)}${drawn.has(`${change} ${levels[k]}`) ? '' : ' (not reached)'}</text>`,
    );
  };
  if (levels.length > 0) {
    y += 18;
    out.push(`<text x="0" y="${y}" font-size="11.5" font-weight="bold">increase (B above A)</text>`);
    for (let k = levels.length - 1; k >= 0; k -= 1) entry('increase', k);
    y += 24;
    out.push(`<text x="0" y="${y}" font-size="11.5" font-weight="bold">decrease (B below A)</text>`);
    for (let k = 0; k < levels.length; k += 1) entry('decrease', k);
  }
  y += 22;
  out.push(`<text x="0" y="${y}" font-size="11" fill="#5a524b">largest increase ${difference.largestIncrease_ug_m3 === 0 ? '0' : `+${difference.largestIncrease_ug_m3}`} µg/m³</text>`);
  y += 14;
  out.push(`<text x="0" y="${y}" font-size="11" fill="#5a524b">largest decrease ${difference.largestDecrease_ug_m3 === 0 ? '0' : `−${Math.abs(difference.largestDecrease_ug_m3)}`} µg/m³</text>`);
  y += 24;
  out.push(`<line x1="0" y1="${y - 12}" x2="250" y2="${y - 12}" stroke="#d8d0c4"/>`);
  const symbol = (drawing: string, text: string): void => {
    y += 20;
    out.push(drawing.replaceAll('Y0', String(y - 4)), `<text x="40" y="${y}" font-size="12">${escapeXml(text)}</text>`);
  };
  if (scenario.sources.some((source) => source.kind === 'point')) {
    symbol(`<path d="${diamond(15, 0, 7)}" transform="translate(0 Y0)" fill="#ffffff" stroke="${INK}" stroke-width="2"/>`, "stack (A's sources)");
  }
  if (scenario.sources.some((source) => source.kind === 'area')) {
    symbol(`<rect x="4" y="-7" width="22" height="14" transform="translate(0 Y0)" fill="url(#area-hatch)" stroke="${INK}" stroke-width="1.4"/>`, 'area source');
  }
  if (scenario.receptors.length > 0) {
    symbol(`<circle cx="15" cy="Y0" r="5" fill="#ffffff" stroke="${RECEPTOR_COLOUR}" stroke-width="2.4"/>`, 'receptor (labelled by id)');
  }
  if (scenario.site.boundary !== undefined) {
    symbol(`<rect x="4" y="-7" width="22" height="14" transform="translate(0 Y0)" fill="none" stroke="${INK}" stroke-width="1.6" stroke-dasharray="2 3"/>`, 'site boundary');
  }
  symbol(`<line x1="2" y1="Y0" x2="28" y2="Y0" stroke="#8c8379" stroke-width="1.5" stroke-dasharray="8 4"/>`, "edge of A's modelled grid");
  for (const layer of words.contextLayers) {
    symbol(`<line x1="2" y1="Y0" x2="28" y2="Y0" stroke="${CONTEXT_COLOUR}" stroke-width="1"/>`, truncate(layer.name, 30));
  }
  out.push('</g>');
  return out;
}

/**
 * The siting figure's sequential scale (plumeplan's own, distinct from the concentration bands): from pale
 * mist for the lowest PC at the receptors (where the stack may go) to deep ink-violet for the highest.
 */
export const SITING_PALETTE = ['#eef3e6', '#cfe2c8', '#a5cdb6', '#77b0a8', '#538b98', '#415f85', '#3a3566'] as const;

/** Fill of siting band k of n: spread over the siting palette, the top band always the darkest. */
export function sitingColour(k: number, n: number): string {
  if (n <= 1) return SITING_PALETTE[SITING_PALETTE.length - 1];
  const index = n >= SITING_PALETTE.length ? Math.round((k * (SITING_PALETTE.length - 1)) / (n - 1)) : SITING_PALETTE.length - n + k;
  return SITING_PALETTE[index];
}

/**
 * Candidates up to this rank carry their rank on the figure; the rest are dots (a site lattice can have
 * hundreds). Where the numbered circles would overlap at the figure's scale, only rank 1 is numbered.
 */
export const LABELLED_CANDIDATE_RANKS = 12;

/** What the siting figure draws: the map's bands and the positions, all in WGS 84 lon/lat. */
export interface SitingFigureInput {
  /** the map's grid (the frame stays inside it; the scale bar measures through its projection) */
  grid: LocalGrid;
  /** the site's position: the figure is drawn in its WGS 84 UTM zone unless `crs` names another */
  site: { lat: number; lon: number };
  crs?: CrsRequest;
  /** the map's isopleth bands (siting.geojson's) */
  bands: FootprintCollection;
  /** the site polygon's ring, or null when the whole domain was searched */
  siteRing: [number, number][] | null;
  receptors: { id: string; lon: number; lat: number }[];
  candidates: { rank: number; id: string; lon: number; lat: number }[];
  best: { lon: number; lat: number; value_ug_m3: number; within: string };
  title: string;
  subtitle: string;
  /** the legend's heading (what a value is) and the lines under it (units, statistic, weather) */
  legendHeading: string;
  legendLines: string[];
  provenance?: RunProvenance;
}

/**
 * Draw the siting figure: the siting map's bands on the sequential siting scale, the site polygon, the
 * sensitive receptors, the candidates with their rank, the best position, grid coordinates, scale bar,
 * north arrow, a legend and the caution line.
 *
 * @returns the SVG text, its size, its CRS and the frame's extent
 * @example const figure = renderSitingMapSvg({ grid, site, bands, siteRing: null, receptors, candidates, best, ... });
 */
export function renderSitingMapSvg(input: SitingFigureInput): MapFigure {
  const crs = input.crs === undefined ? siteUtmCrs(input.site) : resolveCrs(input.crs);
  const converter = lonLatConverter(crs);
  const toCrs = (lon: number, lat: number): [number, number] => converter.forward([lon, lat]);
  const grid = input.grid;
  const gridBox = boxOf(
    [
      [grid.xWest_m, grid.ySouth_m],
      [grid.xWest_m + grid.nx * grid.spacing_m, grid.ySouth_m],
      [grid.xWest_m, grid.ySouth_m + grid.ny * grid.spacing_m],
      [grid.xWest_m + grid.nx * grid.spacing_m, grid.ySouth_m + grid.ny * grid.spacing_m],
    ].map(([x, y]) => toCrs(...grid.projection.toLonLat(x, y))),
  );
  // The frame holds the positions that matter (site, receptors, candidates, best) with a wide margin, so
  // the bands around them read; the map covers the whole grid, the frame shows where the question is.
  const points: [number, number][] = [
    ...(input.siteRing ?? []).map(([lon, lat]) => toCrs(lon, lat)),
    ...input.receptors.map((receptor) => toCrs(receptor.lon, receptor.lat)),
    ...input.candidates.map((candidate) => toCrs(candidate.lon, candidate.lat)),
    toCrs(input.best.lon, input.best.lat),
  ];
  const box = boxOf(points);
  const span = Math.max(box[2] - box[0], box[3] - box[1], 10 * grid.spacing_m);
  const margin = 0.2 * span;
  const extent = square([box[0] - margin, box[1] - margin, box[2] + margin, box[3] + margin], gridBox);
  const [west, , east, north] = extent;
  const scale = FRAME.size / (east - west);
  const px = ([X, Y]: [number, number]): [number, number] => [FRAME.left + (X - west) * scale, FRAME.top + (north - Y) * scale];
  const project = (position: Position): [number, number] => px(toCrs(position[0], position[1]));

  const out: string[] = [
    `<svg xmlns="http://www.w3.org/2000/svg" width="${MAP_WIDTH}" height="${MAP_HEIGHT}" viewBox="0 0 ${MAP_WIDTH} ${MAP_HEIGHT}" ` +
      `font-family="${FIGURE_FONT_FAMILY}" font-size="12" fill="${INK}">`,
    `<title>${escapeXml(`${input.title}: ${input.subtitle}`)}</title>`,
    `<desc id="caution">${escapeXml(SCREENING_CAUTION)}</desc>`,
    `<rect width="${MAP_WIDTH}" height="${MAP_HEIGHT}" fill="#ffffff"/>`,
    `<text x="${FRAME.left}" y="32" font-size="19" font-weight="bold">${escapeXml(truncate(input.title, 80))}</text>`,
    `<text x="${FRAME.left}" y="54" font-size="12.5" fill="#5a524b">${escapeXml(truncate(input.subtitle, 120))}</text>`,
    `<defs><clipPath id="frame-clip"><rect x="${FRAME.left}" y="${FRAME.top}" width="${FRAME.size}" height="${FRAME.size}"/></clipPath></defs>`,
    `<rect x="${FRAME.left}" y="${FRAME.top}" width="${FRAME.size}" height="${FRAME.size}" fill="${PAPER}"/>`,
    '<g clip-path="url(#frame-clip)">',
  ];
  const levels = input.bands.properties.levels_ug_m3;
  for (const feature of input.bands.features) {
    const k = levels.indexOf(feature.properties.lower_ug_m3);
    out.push(
      `<path class="siting-band" data-lower-ug-m3="${feature.properties.lower_ug_m3}" data-upper-ug-m3="${feature.properties.upper_ug_m3 ?? ''}" ` +
        `d="${pathOfRings(ringsOf(feature.geometry), project, true)}" fill="${sitingColour(k, levels.length)}" fill-rule="evenodd" stroke="#4f5b66" stroke-width="0.5" stroke-opacity="0.5"/>`,
    );
  }
  out.push(...graticule(extent, px));
  out.push(...gridOutline(grid, toCrs, px));
  if (input.siteRing !== null) {
    out.push(`<path class="site-polygon" d="${pathOfRings([input.siteRing], project, true)}" fill="#ffffff" fill-opacity="0.12" stroke="${INK}" stroke-width="2" stroke-dasharray="6 3"/>`);
  }
  const crowded = candidatesCrowd(input.candidates.map((candidate) => project([candidate.lon, candidate.lat])));
  // lowest-ranked drawn first, so the best candidates sit on top where they crowd
  for (const candidate of [...input.candidates].sort((a, b) => b.rank - a.rank)) {
    const [x, y] = project([candidate.lon, candidate.lat]);
    // where numbered circles would overlap, only the first rank keeps its number (the table has the rest)
    const labelled = crowded ? candidate.rank === 1 : candidate.rank <= LABELLED_CANDIDATE_RANKS;
    out.push(
      `<g class="candidate" data-id="${escapeXml(candidate.id)}" data-rank="${candidate.rank}" data-numbered="${labelled}">` +
        `<circle cx="${num(x)}" cy="${num(y)}" r="${labelled ? 8 : 2.6}" fill="#ffffff" stroke="${INK}" stroke-width="${labelled ? 1.3 : 0.9}"/>` +
        (labelled ? `<text x="${num(x)}" y="${num(y + 3.5)}" font-size="9.5" text-anchor="middle" font-weight="bold">${candidate.rank}</text>` : '') +
        '</g>',
    );
  }
  const [bx, by] = project([input.best.lon, input.best.lat]);
  // the best position is drawn above the candidates: it is what the figure is for
  out.push(
    `<g class="best-position" data-value-ug-m3="${input.best.value_ug_m3}">` +
      `<path d="${star(bx, by, 13, 5.5)}" fill="#f2c14e" stroke="${INK}" stroke-width="1.6"/></g>`,
  );
  for (const receptor of input.receptors) {
    const [x, y] = project([receptor.lon, receptor.lat]);
    out.push(
      `<g class="receptor" data-id="${escapeXml(receptor.id)}">` +
        `<circle cx="${num(x)}" cy="${num(y)}" r="5" fill="#ffffff" stroke="${RECEPTOR_COLOUR}" stroke-width="2.4"/>` +
        `<text x="${num(x + 9)}" y="${num(y + 4)}" font-size="11" fill="#ffffff" stroke="#ffffff" stroke-width="3" stroke-linejoin="round">${escapeXml(receptor.id)}</text>` +
        `<text x="${num(x + 9)}" y="${num(y + 4)}" font-size="11" fill="${RECEPTOR_COLOUR}">${escapeXml(receptor.id)}</text></g>`,
    );
  }
  out.push('</g>');
  out.push(`<rect x="${FRAME.left}" y="${FRAME.top}" width="${FRAME.size}" height="${FRAME.size}" fill="none" stroke="${INK}" stroke-width="1.2"/>`);
  out.push(...tickLabels(extent, px, crs));
  out.push(...scaleBar(extent, scale, converter, grid));
  out.push(...northArrow(extent, converter));
  out.push(...sitingLegend(input, crowded));
  out.push(...cautionBlock(crs, input.provenance));
  out.push('</svg>');
  return { svg: `${out.join('\n')}\n`, width: MAP_WIDTH, height: MAP_HEIGHT, crs, extent };
}

/** A five-pointed star centred on (x, y), outer radius r, inner radius inner. */
function star(x: number, y: number, r: number, inner: number): string {
  const corners: string[] = [];
  for (let k = 0; k < 10; k += 1) {
    const angle = (Math.PI * k) / 5 - Math.PI / 2;
    const radius = k % 2 === 0 ? r : inner;
    corners.push(`${k === 0 ? 'M' : 'L'}${num(x + radius * Math.cos(angle))} ${num(y + radius * Math.sin(angle))}`);
  }
  return `${corners.join('')}Z`;
}

/** Whether two candidates' numbered circles (radius 8 px) would overlap at the figure's scale. */
function candidatesCrowd(points: [number, number][]): boolean {
  const clearance = 17;
  for (let a = 0; a < points.length; a += 1) {
    for (let b = a + 1; b < points.length; b += 1) {
      if (Math.hypot(points[a][0] - points[b][0], points[a][1] - points[b][1]) < clearance) return true;
    }
  }
  return false;
}

function sitingLegend(input: SitingFigureInput, crowded: boolean): string[] {
  const out = [`<g class="legend siting-legend" transform="translate(${PANEL_LEFT} ${FRAME.top})">`];
  let y = 8;
  for (const line of wrapText(input.legendHeading, 270, 13)) {
    out.push(`<text x="0" y="${y}" font-size="13" font-weight="bold">${escapeXml(line)}</text>`);
    y += 16;
  }
  for (const text of input.legendLines) {
    for (const line of wrapText(text, 270, 11)) {
      out.push(`<text x="0" y="${y}" font-size="11" fill="#5a524b">${escapeXml(line)}</text>`);
      y += 14;
    }
  }
  const levels = input.bands.properties.levels_ug_m3;
  const drawn = new Set(input.bands.features.map((feature) => feature.properties.lower_ug_m3));
  if (levels.length === 0) {
    y += 16;
    out.push(`<text x="0" y="${y}" font-size="11">no bands: the map is zero or flat</text>`);
  }
  for (let k = levels.length - 1; k >= 0; k -= 1) {
    y += 22;
    const upper = k + 1 < levels.length ? levels[k + 1] : null;
    const label = upper === null ? `${levels[k]} and above` : `${levels[k]} to ${upper}`;
    out.push(
      `<rect class="legend-band" x="0" y="${y - 13}" width="30" height="17" fill="${sitingColour(k, levels.length)}" stroke="#4f5b66" stroke-width="0.6"/>`,
      `<text x="40" y="${y}" font-size="12">${escapeXml(label)}${drawn.has(levels[k]) ? '' : ' (not reached)'}</text>`,
    );
  }
  y += 20;
  out.push(`<text x="0" y="${y}" font-size="11" fill="#5a524b">${escapeXml(`best position (${input.best.within}): ${input.best.value_ug_m3} µg/m³`)}</text>`);
  y += 26;
  out.push(`<line x1="0" y1="${y - 12}" x2="250" y2="${y - 12}" stroke="#d8d0c4"/>`);
  const symbol = (drawing: string, text: string): void => {
    y += 22;
    out.push(drawing.replaceAll('Y0', String(y - 4)), `<text x="40" y="${y}" font-size="12">${escapeXml(text)}</text>`);
  };
  symbol(`<path d="${star(15, 0, 11, 4.6)}" transform="translate(0 Y0)" fill="#f2c14e" stroke="${INK}" stroke-width="1.4"/>`, 'best position on the map');
  if (input.candidates.length > 0) {
    symbol(
      `<g transform="translate(15 Y0)"><circle r="8" fill="#ffffff" stroke="${INK}" stroke-width="1.3"/><text y="3.5" font-size="9.5" text-anchor="middle" font-weight="bold">1</text></g>`,
      `candidate and its rank (1 = lowest)`,
    );
    if (crowded) {
      symbol(`<circle cx="15" cy="Y0" r="2.6" fill="#ffffff" stroke="${INK}" stroke-width="0.9"/>`, 'other candidates (too close');
      y += 14;
      out.push(`<text x="40" y="${y}" font-size="12">to number: ranks in the table)</text>`);
    } else if (input.candidates.some((candidate) => candidate.rank > LABELLED_CANDIDATE_RANKS)) {
      symbol(`<circle cx="15" cy="Y0" r="2.6" fill="#ffffff" stroke="${INK}" stroke-width="0.9"/>`, `candidate ranked below ${LABELLED_CANDIDATE_RANKS}`);
    }
  }
  symbol(`<circle cx="15" cy="Y0" r="5" fill="#ffffff" stroke="${RECEPTOR_COLOUR}" stroke-width="2.4"/>`, 'sensitive receptor (by id)');
  if (input.siteRing !== null) {
    symbol(`<rect x="4" y="-7" width="22" height="14" transform="translate(0 Y0)" fill="none" stroke="${INK}" stroke-width="2" stroke-dasharray="6 3"/>`, 'site polygon');
  }
  symbol(`<line x1="2" y1="Y0" x2="28" y2="Y0" stroke="#8c8379" stroke-width="1.5" stroke-dasharray="8 4"/>`, 'edge of the modelled grid');
  out.push('</g>');
  return out;
}
