/**
 * Worker threads over slabs give the same step as the calling thread alone: the field bit for bit (each
 * face flux is computed by the same formula from the same values, whichever slab owns it) and the budget
 * to round-off; also across a weather change and with vertical advection on.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ConstantDiffusivity } from '../../../solver/closures/constantDiffusivity.ts';
import { DryDepositionGround } from '../../../solver/boundaries/boundaryConditions.ts';
import { createDispersionModel, replaceModelParts, type DispersionModel } from '../../../solver/drivers/model.ts';
import { FirstOrderDecay } from '../../../solver/losses/firstOrderLosses.ts';
import { SlabPoolExecutor, slabRows } from '../../../solver/parallel/slabPool.ts';
import { gridEmissionFromSources } from '../../../solver/sources/gridEmission.ts';
import { advanceOneStep, SerialStepExecutor } from '../../../solver/timestepping/timeStepper.ts';
import { uniformColumnWind } from '../../../solver/wind/columnWind.ts';
import { testGrid } from '../verification/testGrid.ts';

const grid = testGrid({ nx: 30, ny: 23, nz: 6, height_m: 120, spacing_m: 20 });
const stack = { kind: 'point' as const, id: 's', x_m: -150, y_m: 10, height_m: 30, diameter_m: 1, exitVelocity_m_s: 1, exitTemperature_K: 300, emission_g_s: 1, plumeRise: false };

function build(simd: boolean): DispersionModel {
  return createDispersionModel({
    grid,
    wind: uniformColumnWind(grid, 3, 250),
    closure: new ConstantDiffusivity(8, 4),
    emission: gridEmissionFromSources(grid, [stack], [30]),
    losses: [FirstOrderDecay(2e-4)],
    boundaries: { ground: DryDepositionGround(0.01) },
    sharedMemory: true,
    simd,
  });
}

let pool: SlabPoolExecutor;
beforeAll(async () => {
  pool = await SlabPoolExecutor.create(3);
});
afterAll(async () => {
  await pool.close();
});

describe('slab pool', () => {
  it('splits rows into contiguous slabs covering the grid', () => {
    expect(slabRows(23, 3)).toEqual([[0, 7], [7, 15], [15, 23]]);
  });

  for (const simd of [true, false]) it(`steps bit for bit as the serial executor, before and after a weather change (SIMD row kernel ${simd ? 'on' : 'off'})`, async () => {
    const serial = build(simd);
    const threaded = build(simd);
    expect(threaded.kernelMemory !== null).toBe(simd);
    await pool.prepare(threaded);
    const serialExecutor = new SerialStepExecutor();
    for (let n = 0; n < 40; n++) {
      if (n === 20) {
        for (const model of [serial, threaded]) replaceModelParts(model, { wind: uniformColumnWind(grid, 5, 170) });
      }
      if (n === 30) {
        // and with vertical advection on (the SIMD kernel hands those rows to the JavaScript loop)
        for (const model of [serial, threaded]) replaceModelParts(model, { wind: uniformColumnWind(grid, 4, 200, { verticalVelocity_m_s: -0.02 }) });
      }
      advanceOneStep(serial, serial.timeStep_s, serialExecutor);
      advanceOneStep(threaded, threaded.timeStep_s, pool);
    }
    expect(threaded.field).toEqual(serial.field);
    expect(threaded.budget.inDomain).toBeGreaterThan(0);
    for (const key of ['emitted', 'inDomain', 'decayed', 'dryDeposited', 'outflow'] as const) {
      expect(Math.abs(threaded.budget[key] - serial.budget[key])).toBeLessThanOrEqual(1e-12 * serial.budget.emitted);
    }
  });

  it('refuses a model whose field is not on shared memory', () => {
    const model = createDispersionModel({ grid, wind: uniformColumnWind(grid, 3, 250), closure: new ConstantDiffusivity(8, 4), simd: false });
    expect(() => advanceOneStep(model, model.timeStep_s, pool)).toThrow(/shared memory/);
  });
});
