/**
 * Fourier modes under diffusion decay as exp(-K m^2 t), so the sharpest peaks decay fastest
 * (../shared/REFERENCES.md, common practice; solver/reference/exactSolutions.ts fourierModeAmplitude).
 * Horizontal: a sum of two sine modes in a periodic box (explicit horizontal diffusion).
 * Vertical: cosine modes between the no-flux ground and lid, eigenmodes of the Neumann problem
 * (implicit vertical diffusion).
 */
import { describe, expect, it } from 'vitest';
import { PeriodicBoundaries } from '../../../solver/boundaries/boundaryConditions.ts';
import { ConstantDiffusivity } from '../../../solver/closures/constantDiffusivity.ts';
import { paddedFieldMass_g } from '../../../solver/fields/paddedLayout.ts';
import { fourierModeAmplitude } from '../../../solver/reference/exactSolutions.ts';
import { uniformColumnWind } from '../../../solver/wind/columnWind.ts';
import { fieldOf, modelWithField, runTo } from './helpers.ts';
import { testGrid } from './testGrid.ts';

/** |sum_n values(n) e^(-i m position(n))|: the amplitude of mode m up to a fixed factor. */
function projection(count: number, value: (n: number) => number, position: (n: number) => number, wavenumber: number, basis: 'sin' | 'cos'): number {
  let sum = 0;
  for (let n = 0; n < count; n++) sum += value(n) * (basis === 'sin' ? Math.sin(wavenumber * position(n)) : Math.cos(wavenumber * position(n)));
  return sum;
}

describe('sine modes decay as exp(-K m^2 t)', () => {
  it('horizontal modes in a periodic box, K = 20 m2/s, within 2 %', () => {
    const nx = 64;
    const spacing = 10;
    const grid = testGrid({ nx, ny: 2, nz: 1, height_m: 10, spacing_m: spacing, xWest_m: 0 });
    const K = 20;
    const m1 = (2 * Math.PI) / (nx * spacing);
    const m3 = 3 * m1;
    const x = (i: number): number => (i + 0.5) * spacing;
    const model = modelWithField(
      { grid, wind: uniformColumnWind(grid, 0, 270), closure: new ConstantDiffusivity(K, 0), boundaries: { lateral: PeriodicBoundaries() } },
      (i) => 1 + 0.5 * Math.sin(m1 * x(i)) + 0.3 * Math.sin(m3 * x(i)),
    );
    const massBefore = paddedFieldMass_g(model.layout, grid, model.field);
    const before1 = projection(nx, (i) => fieldOf(model)[i], x, m1, 'sin');
    const before3 = projection(nx, (i) => fieldOf(model)[i], x, m3, 'sin');
    const t = 60;
    runTo(model, t);
    const after = fieldOf(model);
    const ratio1 = projection(nx, (i) => after[i], x, m1, 'sin') / before1;
    const ratio3 = projection(nx, (i) => after[i], x, m3, 'sin') / before3;
    expect(ratio1 / fourierModeAmplitude(K, m1, t)).toBeCloseTo(1, 2);
    expect(Math.abs(ratio3 / fourierModeAmplitude(K, m3, t) - 1)).toBeLessThan(0.02);
    expect(ratio3).toBeLessThan(ratio1 * 0.5); // the sharper mode has lost far more
    expect(Math.abs(paddedFieldMass_g(model.layout, grid, model.field) / massBefore - 1)).toBeLessThan(1e-13);
  });

  it('vertical cosine modes between ground and lid, Kz = 10 m2/s, within 2 %', () => {
    const nz = 40;
    const height = 200;
    const grid = testGrid({ nx: 2, ny: 2, nz, height_m: height, spacing_m: 10 });
    const K = 10;
    const m1 = Math.PI / height;
    const m3 = 3 * m1;
    const z = (k: number): number => grid.zCentres_m[k];
    const model = modelWithField(
      { grid, wind: uniformColumnWind(grid, 0, 270), closure: new ConstantDiffusivity(0, K), boundaries: { lateral: PeriodicBoundaries() }, maxTimeStep_s: 0.5 },
      (_i, _j, k) => 1 + 0.5 * Math.cos(m1 * z(k)) + 0.4 * Math.cos(m3 * z(k)),
    );
    const column = (field: Float64Array) => (k: number): number => field[4 * k];
    const before1 = projection(nz, column(fieldOf(model)), z, m1, 'cos');
    const before3 = projection(nz, column(fieldOf(model)), z, m3, 'cos');
    const t = 45;
    runTo(model, t);
    const after = fieldOf(model);
    const ratio1 = projection(nz, column(after), z, m1, 'cos') / before1;
    const ratio3 = projection(nz, column(after), z, m3, 'cos') / before3;
    expect(Math.abs(ratio1 / fourierModeAmplitude(K, m1, t) - 1)).toBeLessThan(0.02);
    expect(Math.abs(ratio3 / fourierModeAmplitude(K, m3, t) - 1)).toBeLessThan(0.02);
    expect(ratio3).toBeLessThan(ratio1 * 0.5);
  });
});
