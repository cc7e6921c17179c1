/**
 * Reading the field at points: exact for a field linear in x, y and z between cell and layer centres
 * (bilinear horizontally, linear vertically, by construction), the lowest layer's value below its centre,
 * and the ground-level field at a height. Also the point-source shares: they sum to one and keep the
 * release point's first moment (the trilinear weights' promise).
 */
import { describe, expect, it } from 'vitest';
import { fieldAtHeight, sampleField } from '../../../solver/diagnostics/receptorSampling.ts';
import { paddedIndex, paddedLayout } from '../../../solver/fields/paddedLayout.ts';
import { pointReleaseWeights } from '../../../solver/sources/gridEmission.ts';
import { centreX, centreY, testGrid } from '../verification/testGrid.ts';

const grid = testGrid({ nx: 6, ny: 5, zFaces_m: [0, 2, 5, 10, 20], spacing_m: 10 });
const layout = paddedLayout(grid);
const linear = (x: number, y: number, z: number): number => 3 + 0.2 * x - 0.1 * y + 0.05 * z;
const field = new Float64Array(layout.size);
for (let k = 0; k < grid.nz; k++) for (let j = 0; j < grid.ny; j++) for (let i = 0; i < grid.nx; i++) {
  field[paddedIndex(layout, i, j, k)] = linear(centreX(grid, i), centreY(grid, j), grid.zCentres_m[k]);
}

describe('receptor sampling', () => {
  it('is exact for a linear field between centres', () => {
    for (const [x, y, z] of [[-12, 7, 4], [3.3, -14, 1.2], [0, 0, 14.9]]) {
      expect(sampleField(grid, layout, field, x, y, z)).toBeCloseTo(linear(x, y, z), 12);
    }
  });

  it('uses the lowest layer below its centre and gives the ground-level field per column', () => {
    expect(sampleField(grid, layout, field, 5, 5, 0)).toBeCloseTo(linear(5, 5, grid.zCentres_m[0]), 12);
    const ground = fieldAtHeight(grid, layout, field, 4, 1e6);
    expect(ground.length).toBe(grid.nx * grid.ny);
    expect(ground[2 + grid.nx * 3]).toBeCloseTo(1e6 * linear(centreX(grid, 2), centreY(grid, 3), 4), 6);
  });

  it('rejects a receptor outside the grid, naming the position', () => {
    expect(() => sampleField(grid, layout, field, 500, 0, 1)).toThrow(/outside the grid/);
  });
});

describe('point release shares', () => {
  it('sum to one and keep the first moment of the release point', () => {
    const x = 4.2;
    const y = -6.9;
    const z = 7.3;
    const weights = pointReleaseWeights(grid, x, y, z);
    let total = 0;
    let meanX = 0;
    let meanY = 0;
    let meanZ = 0;
    for (const [cell, weight] of weights) {
      const k = Math.floor(cell / (grid.nx * grid.ny));
      const j = Math.floor((cell - k * grid.nx * grid.ny) / grid.nx);
      const i = cell - grid.nx * (j + grid.ny * k);
      total += weight;
      meanX += weight * centreX(grid, i);
      meanY += weight * centreY(grid, j);
      meanZ += weight * grid.zCentres_m[k];
    }
    expect(total).toBeCloseTo(1, 14);
    expect(meanX).toBeCloseTo(x, 12);
    expect(meanY).toBeCloseTo(y, 12);
    expect(meanZ).toBeCloseTo(z, 12);
  });
});
