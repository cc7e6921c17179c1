/**
 * Worker threads over slabs of rows: the transport step split by rows j, each slab stepped by its own
 * thread on shared memory (the calling thread takes the first slab). Each step costs one message per
 * worker; the calling thread then waits on a shared counter with Atomics, so `step` stays synchronous.
 * The model must keep its field on shared memory (createDispersionModel({ sharedMemory: true })).
 */
import type { Worker } from 'node:worker_threads';
import { fillGhostCells } from '../boundaries/boundaryConditions.ts';
import type { DispersionModel } from '../drivers/model.ts';
import type { StepPlan } from '../timestepping/stepPlan.ts';
import type { StepExecutor } from '../timestepping/timeStepper.ts';
import { TALLY_LENGTH, createSlabScratch, transportSlab, type SlabScratch } from '../timestepping/transportKernel.ts';
import { MAX_SLABS } from '../timestepping/simd/transportRowModule.ts';
import type { SlabMessage } from './slabMessages.ts';
import { createTypeScriptWorker } from './typescriptWorker.ts';

/** Rows [jFrom, jTo) of each of `slabs` slabs, as equal as possible. */
export function slabRows(ny: number, slabs: number): [number, number][] {
  const rows: [number, number][] = [];
  for (let s = 0; s < slabs; s++) rows.push([Math.floor((s * ny) / slabs), Math.floor(((s + 1) * ny) / slabs)]);
  return rows;
}

export class SlabPoolExecutor implements StepExecutor {
  readonly name: string;
  private workers: Worker[] = [];
  private model: DispersionModel | null = null;
  private buffers: [SharedArrayBuffer, SharedArrayBuffer] | null = null;
  private offsets: [number, number] = [0, 0];
  private rows: [number, number][] = [];
  private scratch: SlabScratch | null = null;
  private readonly counter = new Int32Array(new SharedArrayBuffer(4));
  private tally: Float64Array;
  private readonly sum = new Float64Array(TALLY_LENGTH);
  private lastPlan: StepPlan | null = null;
  private planId = 0;
  /** the first error a worker reported; steps fail with it */
  private failure: Error | null = null;

  private constructor(readonly threads: number) {
    this.name = `SlabPoolExecutor(${threads} threads)`;
    this.tally = new Float64Array(new SharedArrayBuffer(threads * TALLY_LENGTH * 8));
  }

  /**
   * Start a pool. Resolves once every worker has loaded the kernel.
   *
   * @param threads threads in all, the calling one included (>= 1)
   */
  static async create(threads: number): Promise<SlabPoolExecutor> {
    if (!Number.isInteger(threads) || threads < 1 || threads > 64) {
      throw new RangeError(`threads is ${threads}; allowed: an integer from 1 to 64`);
    }
    const pool = new SlabPoolExecutor(threads);
    const url = new URL('./slabWorker.ts', import.meta.url);
    pool.workers = Array.from({ length: threads - 1 }, () => createTypeScriptWorker(url));
    for (const worker of pool.workers) {
      worker.unref();
      worker.on('error', (error) => {
        pool.failure = error;
      });
    }
    return pool;
  }

  private attach(model: DispersionModel): Promise<void> | void {
    const a = model.field.buffer;
    const b = model.spare.buffer;
    if (!(a instanceof SharedArrayBuffer) || !(b instanceof SharedArrayBuffer)) {
      throw new RangeError('the model field is not on shared memory; build it with createDispersionModel({ sharedMemory: true })');
    }
    const offsetA = model.field.byteOffset;
    const offsetB = model.spare.byteOffset;
    if (this.model === model && this.buffers && this.isAttached(model.field) && this.isAttached(model.spare)) return;
    if (model.kernelMemory !== null && this.threads > MAX_SLABS) {
      throw new RangeError(`threads is ${this.threads}; the SIMD kernel memory has scratch for at most ${MAX_SLABS}`);
    }
    this.model = model;
    this.buffers = [a, b];
    this.offsets = [offsetA, offsetB];
    this.rows = slabRows(model.grid.ny, this.threads);
    this.scratch = createSlabScratch(model.grid.nx, this.rows[0][1] - this.rows[0][0], model.kernelMemory, 0);
    this.lastPlan = null;
    this.workers.forEach((worker, w) => {
      const [jFrom, jTo] = this.rows[w + 1];
      const message: SlabMessage = {
        type: 'setup',
        fields: [a, b],
        fieldOffsets: [offsetA, offsetB],
        kernelMemory: model.kernelMemory,
        tally: this.tally.buffer as SharedArrayBuffer,
        counter: this.counter.buffer as SharedArrayBuffer,
        layout: model.layout,
        jFrom,
        jTo,
        slab: w + 1,
      };
      worker.postMessage(message);
    });
  }

  private isAttached(field: Float64Array): boolean {
    const buffers = this.buffers!;
    return (field.buffer === buffers[0] && field.byteOffset === this.offsets[0]) || (field.buffer === buffers[1] && field.byteOffset === this.offsets[1]);
  }

  /** Attach a model ahead of the first step and wait until every worker has it (keeps set-up out of timings). */
  async prepare(model: DispersionModel): Promise<void> {
    const ready = this.workers.map((worker) => new Promise<void>((resolve) => worker.once('message', () => resolve())));
    this.model = null;
    this.attach(model);
    await Promise.all(ready);
  }

  step(model: DispersionModel, plan: StepPlan, previous: Float64Array, next: Float64Array): Float64Array {
    this.attach(model);
    const buffers = this.buffers!;
    const previousIndex: 0 | 1 = previous.buffer === buffers[0] && previous.byteOffset === this.offsets[0] ? 0 : 1;
    if (plan !== this.lastPlan) {
      this.planId++;
      this.lastPlan = plan;
      const message: SlabMessage = { type: 'plan', planId: this.planId, plan, lateral: model.boundaries.lateral, u_m_s: model.wind.u_m_s, v_m_s: model.wind.v_m_s };
      for (const worker of this.workers) worker.postMessage(message);
    }
    Atomics.store(this.counter, 0, 0);
    const stepMessage: SlabMessage = { type: 'step', planId: this.planId, previous: previousIndex };
    for (const worker of this.workers) worker.postMessage(stepMessage);
    const [jFrom, jTo] = this.rows[0];
    fillGhostCells(model.layout, previous, model.boundaries.lateral, model.wind.u_m_s, model.wind.v_m_s, jFrom, jTo);
    this.tally.fill(0, 0, TALLY_LENGTH);
    transportSlab(plan, previous, next, jFrom, jTo, this.scratch!, this.tally, 0);
    const expected = this.workers.length;
    for (let waited = 0; ; waited++) {
      const done = Atomics.load(this.counter, 0);
      if (done >= expected) break;
      if (this.failure || waited > 600) {
        throw new Error(`slab pool: a worker failed or stopped answering (${this.failure?.message ?? 'no answer for 60 s'})`);
      }
      Atomics.wait(this.counter, 0, done, 100);
    }
    this.sum.fill(0);
    for (let s = 0; s < this.threads; s++) for (let t = 0; t < TALLY_LENGTH; t++) this.sum[t] += this.tally[s * TALLY_LENGTH + t];
    return this.sum;
  }

  async close(): Promise<void> {
    await Promise.all(this.workers.map((worker) => worker.terminate()));
    this.workers = [];
  }
}
