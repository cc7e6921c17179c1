/** Shared helpers for the verification cases: build, run, read back the field. */
import { createDispersionModel, setInitialField, type DispersionModel, type DispersionModelParts } from '../../../solver/drivers/model.ts';
import { paddedToGridOrder } from '../../../solver/fields/paddedLayout.ts';
import { runSimulation } from '../../../solver/timestepping/runLoop.ts';

export function modelWithField(parts: DispersionModelParts, initial?: (i: number, j: number, k: number) => number): DispersionModel {
  const model = createDispersionModel(parts);
  if (initial) {
    const { nx, ny, nz } = parts.grid;
    const field = new Float64Array(nx * ny * nz);
    for (let k = 0; k < nz; k++) for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) field[i + nx * (j + ny * k)] = initial(i, j, k);
    setInitialField(model, field);
  }
  return model;
}

export function runTo(model: DispersionModel, stopTime_s: number): DispersionModel {
  runSimulation({ model, stopTime_s, callbacks: [] });
  return model;
}

/** The field in the public order i + nx * (j + ny * k) [g/m3]. */
export function fieldOf(model: DispersionModel): Float64Array {
  return paddedToGridOrder(model.layout, model.field);
}

export function extremes(values: Float64Array): { min: number; max: number; argmax: number } {
  let min = Infinity;
  let max = -Infinity;
  let argmax = -1;
  for (let n = 0; n < values.length; n++) {
    if (values[n] < min) min = values[n];
    if (values[n] > max) {
      max = values[n];
      argmax = n;
    }
  }
  return { min, max, argmax };
}
