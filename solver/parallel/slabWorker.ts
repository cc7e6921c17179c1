/**
 * A worker thread of the slab pool: steps its own rows of the shared field when told, adds its tally and
 * bumps the shared completion counter (the pool waits on it with Atomics).
 */
import { parentPort } from 'node:worker_threads';
import { fillGhostCells } from '../boundaries/boundaryConditions.ts';
import { TALLY_LENGTH, createSlabScratch, transportSlab, type SlabScratch } from '../timestepping/transportKernel.ts';
import type { SlabMessage, SlabPlan, SlabSetup } from './slabMessages.ts';

let setup: SlabSetup | null = null;
let fields: [Float64Array, Float64Array] | null = null;
let tally: Float64Array | null = null;
let counter: Int32Array | null = null;
let scratch: SlabScratch | null = null;
let current: SlabPlan | null = null;

const port = parentPort;
if (port === null) throw new Error('slabWorker must run in a worker thread');

port.on('message', (message: SlabMessage) => {
  switch (message.type) {
    case 'setup':
      setup = message;
      fields = [
        new Float64Array(message.fields[0], message.fieldOffsets[0], message.layout.size),
        new Float64Array(message.fields[1], message.fieldOffsets[1], message.layout.size),
      ];
      tally = new Float64Array(message.tally);
      counter = new Int32Array(message.counter);
      scratch = createSlabScratch(message.layout.nx, message.jTo - message.jFrom, message.kernelMemory, message.slab);
      port.postMessage({ type: 'ready' });
      break;
    case 'plan':
      current = message;
      break;
    case 'step': {
      if (!setup || !fields || !tally || !counter || !scratch || !current || current.planId !== message.planId) {
        throw new Error(`slab worker: step ${message.planId} arrived before its setup or plan`);
      }
      const previous = fields[message.previous];
      const next = fields[1 - message.previous];
      fillGhostCells(setup.layout, previous, current.lateral, current.u_m_s, current.v_m_s, setup.jFrom, setup.jTo);
      const offset = setup.slab * TALLY_LENGTH;
      tally.fill(0, offset, offset + TALLY_LENGTH);
      transportSlab(current.plan, previous, next, setup.jFrom, setup.jTo, scratch, tally, offset);
      Atomics.add(counter, 0, 1);
      Atomics.notify(counter, 0);
      break;
    }
    case 'close':
      port.close();
      break;
  }
});
