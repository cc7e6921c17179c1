/**
 * Where a ground-level field reaches the domain's edge at or above a level: the footprint's band at that
 * level is cut there, and the figures beyond the edge are not computed. Read on the outermost cells of
 * each side (index i + nx * j, x east, y north).
 */
import type { LocalGrid } from '../grid/types.ts';

export type DomainSide = 'west' | 'east' | 'south' | 'north';

export interface EdgeCut {
  side: DomainSide;
  /** length of the side over which the edge cells are at or above the level [m] */
  length_m: number;
  /** where along the side that stretch begins and ends, local metres (x for south/north, y for west/east) [m] */
  from_m: number;
  to_m: number;
  /** the largest edge value on that side [same unit as the field] */
  largest: number;
}

/**
 * The sides along which a field at or above `level` touches the edge.
 *
 * @param grid the grid the field is on
 * @param field one value per column, index i + nx * j
 * @param level the lowest level shown [same unit as the field], > 0
 * @returns one entry per side that is cut (none when the field stays inside)
 * @example footprintEdgeCuts(grid, ground_ug_m3, 0.2) // [{ side: 'east', length_m: 650, ... }]
 */
export function footprintEdgeCuts(grid: LocalGrid, field: ArrayLike<number>, level: number): EdgeCut[] {
  if (!(level > 0) || !Number.isFinite(level)) throw new RangeError(`level is ${level}; allowed: a finite level > 0`);
  if (field.length !== grid.nx * grid.ny) throw new RangeError(`field has ${field.length} values; the grid has ${grid.nx * grid.ny} columns`);
  const { nx, ny, spacing_m: dx } = grid;
  const sides: { side: DomainSide; count: number; index: (n: number) => number; position: (n: number) => number }[] = [
    { side: 'west', count: ny, index: (j) => nx * j, position: (j) => grid.ySouth_m + j * dx },
    { side: 'east', count: ny, index: (j) => nx - 1 + nx * j, position: (j) => grid.ySouth_m + j * dx },
    { side: 'south', count: nx, index: (i) => i, position: (i) => grid.xWest_m + i * dx },
    { side: 'north', count: nx, index: (i) => i + nx * (ny - 1), position: (i) => grid.xWest_m + i * dx },
  ];
  const cuts: EdgeCut[] = [];
  for (const { side, count, index, position } of sides) {
    let cells = 0;
    let first = -1;
    let last = -1;
    let largest = 0;
    for (let n = 0; n < count; n++) {
      const value = field[index(n)];
      if (value >= level) {
        cells++;
        if (first < 0) first = n;
        last = n;
        if (value > largest) largest = value;
      }
    }
    if (cells > 0) cuts.push({ side, length_m: cells * dx, from_m: position(first), to_m: position(last) + dx, largest });
  }
  return cuts;
}

/** A plain note for each cut side [-]; `unit` names the field's unit. */
export function edgeCutNotes(cuts: readonly EdgeCut[], level: number, unit = 'ug/m3'): string[] {
  const round = (value: number): string => Number(value.toPrecision(3)).toString();
  return cuts.map(
    (cut) =>
      `domain edge: the ${round(level)} ${unit} band of the footprint reaches the ${cut.side} edge over ${round(cut.length_m)} m ` +
      `(${cut.side === 'west' || cut.side === 'east' ? 'y' : 'x'} ${round(cut.from_m)} to ${round(cut.to_m)} m from the site), with edge values up to ` +
      `${round(cut.largest)} ${unit}, ${round(cut.largest / level)} times the level: the band goes on beyond the domain and is cut there; ` +
      'a larger domain (halfWidth_m) would show where it ends',
  );
}
