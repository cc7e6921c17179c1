/**
 * The wind rose of the weather a run used, as a table of frequencies by direction sector and speed
 * class, with the calm fraction and the stability-class frequencies. Built from the hours of a series
 * or from the cells of a wind-rose weather, so both kinds of run can draw the same picture.
 *
 * Conventions: direction is where the wind blows FROM, clockwise from north; sector s is centred on
 * s * sectorWidth_deg and covers half a width either side; calm hours (speed raised by the calms rule)
 * are counted apart from the sectors, as is usual on a wind rose (common practice).
 */
import type { StabilityClass, WindRoseCell } from '../../scenarios/format/types.ts';
import type { ResolvedWeather } from '../drivers/types.ts';

/** Lower edges of the speed classes [m/s]; the last class is open above (plumeplan's choice). */
export const DEFAULT_SPEED_CLASS_EDGES_m_s: readonly number[] = [1, 2, 3, 5, 8, 11];

/** Sector width used for a series' wind rose [deg] (12 sectors, common practice). */
export const DEFAULT_SECTOR_WIDTH_deg = 30;

export interface WindRoseTable {
  sectorWidth_deg: number;
  /** centre of each sector [deg from north] */
  sectorCentres_deg: number[];
  /** lower edge of each speed class [m/s]; class c covers [edge c, edge c+1), the last is open */
  speedClassEdges_m_s: number[];
  /** fraction of all time in [sector][speed class] [-] */
  frequency: number[][];
  /** fraction of all time calm [-] */
  calmFraction: number;
  /** fraction of all time in each stability class [-] */
  stabilityFrequency: Record<StabilityClass, number>;
  /** what the fractions are of, e.g. "8760 hours" or "wind-rose frequencies" */
  basis: string;
}

function emptyTable(sectorWidth_deg: number, edges: readonly number[], basis: string): WindRoseTable {
  if (!(sectorWidth_deg > 0 && sectorWidth_deg <= 360 && Number.isInteger(360 / sectorWidth_deg))) {
    throw new RangeError(`sectorWidth_deg: ${sectorWidth_deg} is not allowed (a width that divides 360 degrees)`);
  }
  const sectors = Math.round(360 / sectorWidth_deg);
  return {
    sectorWidth_deg,
    sectorCentres_deg: Array.from({ length: sectors }, (_, s) => s * sectorWidth_deg),
    speedClassEdges_m_s: [...edges],
    frequency: Array.from({ length: sectors }, () => new Array<number>(edges.length).fill(0)),
    calmFraction: 0,
    stabilityFrequency: { A: 0, B: 0, C: 0, D: 0, E: 0, F: 0 },
    basis,
  };
}

/** Sector index of a direction [deg] for sectors of the given width centred on multiples of it. */
export function sectorIndex(windFrom_deg: number, sectorWidth_deg: number): number {
  const sectors = Math.round(360 / sectorWidth_deg);
  const shifted = (((windFrom_deg + sectorWidth_deg / 2) % 360) + 360) % 360;
  return Math.min(sectors - 1, Math.floor(shifted / sectorWidth_deg));
}

/** Speed class of a speed [m/s] (speeds below the first edge go in the first class). */
export function speedClassIndex(windSpeed_m_s: number, edges: readonly number[]): number {
  let index = 0;
  while (index + 1 < edges.length && windSpeed_m_s >= edges[index + 1]) index++;
  return index;
}

/**
 * The wind rose of a series of resolved hours (each hour counts equally).
 *
 * @param hours the resolved weather of each hour present
 */
export function windRoseFromHours(
  hours: readonly ResolvedWeather[],
  sectorWidth_deg = DEFAULT_SECTOR_WIDTH_deg,
  edges: readonly number[] = DEFAULT_SPEED_CLASS_EDGES_m_s,
): WindRoseTable {
  const table = emptyTable(sectorWidth_deg, edges, `${hours.length} hours`);
  if (hours.length === 0) return table;
  const share = 1 / hours.length;
  for (const hour of hours) {
    table.stabilityFrequency[hour.stability] += share;
    if (hour.calm) {
      table.calmFraction += share;
      continue;
    }
    table.frequency[sectorIndex(hour.windFrom_deg, sectorWidth_deg)][speedClassIndex(hour.windSpeed_m_s, edges)] += share;
  }
  return table;
}

/**
 * The wind rose of wind-rose weather: its own sectors, the cells' frequencies binned by speed class.
 * Cells whose representative speed is below the calms threshold count as calm.
 */
export function windRoseFromCells(
  cells: readonly WindRoseCell[],
  sectorWidth_deg: number,
  calmThreshold_m_s: number,
  edges: readonly number[] = DEFAULT_SPEED_CLASS_EDGES_m_s,
): WindRoseTable {
  const table = emptyTable(sectorWidth_deg, edges, 'wind-rose frequencies');
  for (const cell of cells) {
    table.stabilityFrequency[cell.stability] += cell.frequency;
    if (cell.windSpeed_m_s < calmThreshold_m_s) {
      table.calmFraction += cell.frequency;
      continue;
    }
    table.frequency[sectorIndex(cell.windFrom_deg, sectorWidth_deg)][speedClassIndex(cell.windSpeed_m_s, edges)] += cell.frequency;
  }
  return table;
}
