/**
 * The embedded WebAssembly row kernel is the assembly of its source (fixture comparison; REGEN=1 rewrites
 * solver/timestepping/simd/transportRowBytes.ts), and a transport step with it equals the JavaScript
 * loop's bit for bit.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import wabtInit from 'wabt';
import { ConstantDiffusivity } from '../../../solver/closures/constantDiffusivity.ts';
import { DryDepositionGround } from '../../../solver/boundaries/boundaryConditions.ts';
import { createDispersionModel, setInitialField } from '../../../solver/drivers/model.ts';
import { FirstOrderDecay } from '../../../solver/losses/firstOrderLosses.ts';
import { gridEmissionFromSources } from '../../../solver/sources/gridEmission.ts';
import { TRANSPORT_ROW_WASM_BASE64 } from '../../../solver/timestepping/simd/transportRowBytes.ts';
import { transportRowModule } from '../../../solver/timestepping/simd/transportRowModule.ts';
import { advanceOneStep } from '../../../solver/timestepping/timeStepper.ts';
import { uniformColumnWind } from '../../../solver/wind/columnWind.ts';
import { paddedToGridOrder } from '../../../solver/fields/paddedLayout.ts';
import { testGrid } from '../verification/testGrid.ts';

const SOURCE = new URL('../../../solver/timestepping/simd/transportRow.wat', import.meta.url);
const BYTES_FILE = new URL('../../../solver/timestepping/simd/transportRowBytes.ts', import.meta.url);

describe('WebAssembly SIMD row kernel', () => {
  it('embedded bytes are the assembly of transportRow.wat', async () => {
    const wabt = await wabtInit();
    const features = { simd: true, threads: true };
    const parsed = wabt.parseWat('transportRow.wat', readFileSync(SOURCE, 'utf8'), features);
    (parsed.validate as (options: object) => void)(features);
    const base64 = Buffer.from(parsed.toBinary({}).buffer).toString('base64');
    if (process.env.REGEN === '1') {
      writeFileSync(
        BYTES_FILE,
        `/** Generated from transportRow.wat by tests/solver/timestepping/transportRowWasm.test.ts (REGEN=1); do not edit. */\nexport const TRANSPORT_ROW_WASM_BASE64 =\n  '${base64}';\n`,
      );
    }
    expect(TRANSPORT_ROW_WASM_BASE64).toBe(base64);
  });

  it('steps bit for bit as the JavaScript loop', () => {
    expect(transportRowModule()).not.toBeNull();
    const grid = testGrid({ nx: 24, ny: 13, nz: 5, height_m: 100, spacing_m: 20 });
    const stack = { kind: 'point' as const, id: 's', x_m: -150, y_m: 10, height_m: 30, diameter_m: 1, exitVelocity_m_s: 1, exitTemperature_K: 300, emission_g_s: 1, plumeRise: false };
    const build = (simd: boolean) => {
      const model = createDispersionModel({
        grid,
        wind: uniformColumnWind(grid, 3, 250),
        closure: new ConstantDiffusivity(8, 4),
        emission: gridEmissionFromSources(grid, [stack], [30]),
        losses: [FirstOrderDecay(2e-4)],
        boundaries: { ground: DryDepositionGround(0.01) },
        simd,
      });
      let seed = 7;
      setInitialField(model, Float64Array.from({ length: grid.nx * grid.ny * grid.nz }, () => ((seed = (seed * 16807) % 2147483647) / 2147483647) * 1e-3));
      return model;
    };
    const withSimd = build(true);
    const withoutSimd = build(false);
    expect(withSimd.kernelMemory).not.toBeNull();
    expect(withoutSimd.kernelMemory).toBeNull();
    for (let n = 0; n < 25; n++) {
      advanceOneStep(withSimd);
      advanceOneStep(withoutSimd);
    }
    expect(paddedToGridOrder(withSimd.layout, withSimd.field)).toEqual(paddedToGridOrder(withoutSimd.layout, withoutSimd.field));
    expect(withSimd.budget).toEqual(withoutSimd.budget);
  });
});
