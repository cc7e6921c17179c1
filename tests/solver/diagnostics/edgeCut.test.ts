/**
 * Where the footprint's lowest band is cut at the domain's edge (solver/diagnostics/edgeCut.ts):
 * behaviour checks on a made-up field.
 */
import { describe, expect, it } from 'vitest';
import { edgeCutNotes, footprintEdgeCuts } from '../../../solver/diagnostics/edgeCut.ts';
import { testGrid } from '../verification/testGrid.ts';

describe('footprintEdgeCuts', () => {
  const grid = testGrid({ nx: 10, ny: 8, nz: 2, height_m: 100, spacing_m: 50, xWest_m: -250, ySouth_m: -200 });

  it('finds the stretch of the east edge at or above the level, and nothing where the field stays inside', () => {
    const field = new Float64Array(grid.nx * grid.ny);
    for (let j = 2; j <= 4; j++) field[grid.nx - 1 + grid.nx * j] = 0.5 + j; // rows 2-4 of the east edge
    field[3 + grid.nx * 3] = 100; // inside: no cut
    const cuts = footprintEdgeCuts(grid, field, 1);
    expect(cuts).toEqual([{ side: 'east', length_m: 150, from_m: -100, to_m: 50, largest: 4.5 }]);
    expect(footprintEdgeCuts(grid, field, 5)).toEqual([]);
    expect(edgeCutNotes(cuts, 1)[0]).toBe(
      'domain edge: the 1 ug/m3 band of the footprint reaches the east edge over 150 m (y -100 to 50 m from the site), with edge values up to ' +
        '4.5 ug/m3, 4.5 times the level: the band goes on beyond the domain and is cut there; a larger domain (halfWidth_m) would show where it ends',
    );
  });

  it('refuses a level that is not positive', () => {
    expect(() => footprintEdgeCuts(grid, new Float64Array(80), 0)).toThrow(/level is 0/);
  });
});
