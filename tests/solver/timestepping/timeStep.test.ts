/**
 * The Courant time step and the run loop's guard: the positivity number of the chosen step meets the
 * stated target (COURANT_TARGET = 0.9, below 1), the step is recomputed when the wind changes, and the
 * field-health guard installed by default stops a run with a message naming the bad value and the cell.
 */
import { describe, expect, it } from 'vitest';
import { ConstantDiffusivity } from '../../../solver/closures/constantDiffusivity.ts';
import { createDispersionModel, replaceModelParts } from '../../../solver/drivers/model.ts';
import { paddedIndex } from '../../../solver/fields/paddedLayout.ts';
import { runSimulation, type Callback } from '../../../solver/timestepping/runLoop.ts';
import { COURANT_TARGET, positivityNumber } from '../../../solver/timestepping/stepPlan.ts';
import { uniformColumnWind } from '../../../solver/wind/columnWind.ts';
import { testGrid } from '../verification/testGrid.ts';

const grid = testGrid({ nx: 12, ny: 10, nz: 4, height_m: 40, spacing_m: 20 });

describe('time step from the Courant number', () => {
  it('meets the target exactly when advection limits it, and is recomputed when the wind changes', () => {
    const model = createDispersionModel({ grid, wind: uniformColumnWind(grid, 5, 240), closure: new ConstantDiffusivity(3, 1) });
    expect(COURANT_TARGET).toBeLessThan(1);
    expect(positivityNumber(model.physics, model.timeStep_s)).toBeCloseTo(COURANT_TARGET, 9);
    const slowStep = model.timeStep_s;
    replaceModelParts(model, { wind: uniformColumnWind(grid, 10, 240) });
    expect(model.timeStep_s).toBeLessThan(slowStep * 0.6);
    expect(positivityNumber(model.physics, model.timeStep_s)).toBeCloseTo(COURANT_TARGET, 9);
  });

  it('caps the step when nothing limits it (calm, no horizontal diffusion)', () => {
    const model = createDispersionModel({ grid, wind: uniformColumnWind(grid, 0, 0), closure: new ConstantDiffusivity(0, 5), maxTimeStep_s: 30 });
    expect(model.timeStep_s).toBe(30);
  });

  it('lands the last step on the stop time and calls scheduled callbacks', () => {
    const model = createDispersionModel({ grid, wind: uniformColumnWind(grid, 5, 240), closure: new ConstantDiffusivity(3, 1) });
    const times: number[] = [];
    const recorder: Callback = { name: 'recorder', schedule: { kind: 'time', every_s: 10 }, run: (simulation) => times.push(simulation.model.clock.time_s) };
    runSimulation({ model, stopTime_s: 47, callbacks: [recorder] });
    expect(model.clock.time_s).toBeCloseTo(47, 9);
    expect(times.length).toBe(4);
  });
});

describe('field-health guard', () => {
  it('stops the run with the value and the cell when the field holds a NaN', () => {
    const model = createDispersionModel({ grid, wind: uniformColumnWind(grid, 5, 240), closure: new ConstantDiffusivity(3, 1) });
    model.field[paddedIndex(model.layout, 3, 4, 1)] = Number.NaN;
    expect(() => runSimulation({ model, stopTime_s: 100, callbacks: [] })).toThrow(/grid solver stopped: concentration is NaN/);
  });

  it('stops the run when a value is clearly negative', () => {
    const model = createDispersionModel({ grid, wind: uniformColumnWind(grid, 5, 240), closure: new ConstantDiffusivity(3, 1) });
    model.field[paddedIndex(model.layout, 5, 5, 0)] = 1;
    model.field[paddedIndex(model.layout, 7, 2, 2)] = -0.5;
    expect(() => runSimulation({ model, stopTime_s: 1, callbacks: [] })).toThrow(/negative/);
  });
});
