/**
 * The WebAssembly SIMD row kernel (./transportRow.wat), embedded as bytes so no build step or assembler
 * is needed at run time. tests/solver/timestepping/transportRowWasm.test.ts assembles the .wat with wabt
 * and checks it equals these bytes (REGEN=1 rewrites them).
 *
 * Memory the kernel works on: one shared WebAssembly memory per model holding both field buffers and the
 * per-slab scratch rows (`createKernelMemory`).
 */
import { TRANSPORT_ROW_WASM_BASE64 } from './transportRowBytes.ts';

/** The row function's signature (byte addresses, counts, coefficients; see transportRow.wat). */
export type TransportRowFunction = (
  previous: number,
  next: number,
  below: number,
  slopeY: number,
  fluxY: number,
  pairs: number,
  rowBytes: number,
  cxPlus: number,
  cxMinus: number,
  ax: number,
  dxn: number,
  cyPlus: number,
  cyMinus: number,
  ay: number,
  dyn: number,
  lower: number,
  inversePivot: number,
  slopeOfCell0: number,
  fluxWestFace: number,
) => number;

/** The few WebAssembly JS-API members used here (the project's TypeScript lib has no WebAssembly values). */
export interface WasmMemory {
  readonly buffer: ArrayBufferLike;
}
interface WasmModule {
  readonly wasmModule: true;
}
interface WasmApi {
  validate(bytes: Uint8Array): boolean;
  Module: new (bytes: Uint8Array) => WasmModule;
  Instance: new (module: WasmModule, imports: Record<string, Record<string, unknown>>) => { exports: Record<string, unknown> };
  Memory: new (descriptor: { initial: number; maximum: number; shared: boolean }) => WasmMemory;
}
const wasm = (globalThis as unknown as { WebAssembly?: WasmApi }).WebAssembly;

let compiled: WasmModule | null | undefined;

/** The compiled module, or null where this runtime has no WebAssembly SIMD or shared memory. */
export function transportRowModule(): WasmModule | null {
  if (compiled === undefined) {
    try {
      const bytes = Uint8Array.from(atob(TRANSPORT_ROW_WASM_BASE64), (character) => character.charCodeAt(0));
      compiled = wasm !== undefined && typeof SharedArrayBuffer === 'function' && wasm.validate(bytes) ? new wasm.Module(bytes) : null;
    } catch {
      compiled = null;
    }
  }
  return compiled;
}

/** Most slabs (threads) one model's memory has scratch rows for. */
export const MAX_SLABS = 16;

const PAGE_BYTES = 65536;

export interface KernelMemory {
  readonly memory: WasmMemory;
  /** byte offsets of the two field buffers */
  readonly fieldOffsets: [number, number];
  /** doubles per field */
  readonly fieldLength: number;
  /** byte offset of slab 0's scratch rows (slopeY then fluxY, nx doubles each; slabs follow one another) */
  readonly scratchBase: number;
  readonly nx: number;
}

/** Byte offset of a slab's scratch rows in a kernel memory. */
export function kernelScratchOffset(kernel: KernelMemory, slab: number): number {
  return kernel.scratchBase + slab * 2 * kernel.nx * 8;
}

/**
 * Shared memory for a model's two fields and the scratch rows of up to MAX_SLABS slabs, or null when the
 * SIMD kernel is unavailable. Plain data (no functions), so it can be posted to worker threads.
 */
export function createKernelMemory(fieldLength: number, nx: number): KernelMemory | null {
  if (transportRowModule() === null) return null;
  const fieldBytes = fieldLength * 8;
  const scratchBytes = MAX_SLABS * 2 * nx * 8;
  const pages = Math.ceil((2 * fieldBytes + scratchBytes) / PAGE_BYTES) + 1;
  if (pages > 65536) return null;
  let memory: WasmMemory;
  try {
    memory = new wasm!.Memory({ initial: pages, maximum: pages, shared: true });
  } catch {
    // Too large for one shared WebAssembly memory here: the JavaScript loop on plain arrays instead.
    return null;
  }
  return {
    memory,
    fieldOffsets: [0, fieldBytes],
    fieldLength,
    nx,
    scratchBase: 2 * fieldBytes,
  };
}

/** An instance of the row kernel on a model's memory (one per thread). */
export function instantiateTransportRow(kernel: KernelMemory): TransportRowFunction {
  const module = transportRowModule();
  if (module === null) throw new Error('the WebAssembly SIMD row kernel is not available in this runtime');
  const instance = new wasm!.Instance(module, { env: { memory: kernel.memory } });
  return instance.exports.row as TransportRowFunction;
}
