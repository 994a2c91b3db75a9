/**
 * Loads the sparse LU kernels (sparse-lu-kernels.wat, assembled into sparse-lu-kernels.ts) and
 * lays out one factorisation's arrays in a WebAssembly memory of its own. The module (about 2 kB)
 * is compiled once per process, synchronously; each factorisation gets its own instance and
 * memory, released with it. Unitless.
 */
import { SPARSE_LU_KERNELS_BASE64 } from "./sparse-lu-kernels.ts";

/** The kernels' exports; every array argument is a byte address in the instance's memory. */
export interface SparseLUKernels {
  load(n: number, nnz: number, nnzA: number, shift: number, scale: number, val: number, values: number, aMap: number, aRow: number, diag: number, rowMax: number): void;
  eliminateScheduled(n: number, val: number, luPtr: number, luCol: number, diag: number, invDiag: number, rowMax: number, sched: number, schedPtr: number): number;
  eliminateScatter(n: number, val: number, luPtr: number, luCol: number, diag: number, invDiag: number, where: number): number;
  solve(n: number, val: number, luPtr: number, colOrig: number, diag: number, perm: number, invDiag: number, b: number): void;
}

let compiled: WebAssembly.Module | null = null;

function kernelModule(): WebAssembly.Module {
  if (compiled === null) {
    const text = atob(SPARSE_LU_KERNELS_BASE64);
    const bytes = new Uint8Array(text.length);
    for (let i = 0; i < text.length; i++) bytes[i] = text.charCodeAt(i);
    compiled = new WebAssembly.Module(bytes);
  }
  return compiled;
}

const PAGE = 65536;

/**
 * Bump allocator for one factorisation: reserve arrays (byte addresses, 8-byte aligned), then
 * `instantiate()` creates the memory, copies the initial contents in and returns the kernels.
 */
export class WasmArena {
  private size = 0;
  private readonly copies: { at: number; data: Int32Array }[] = [];
  private memory: WebAssembly.Memory | null = null;

  private reserve(bytes: number): number {
    const at = this.size;
    this.size += Math.ceil(bytes / 8) * 8;
    return at;
  }

  /** Reserve a zeroed Float64 array of `length` elements; returns its byte address. */
  f64(length: number): number {
    return this.reserve(8 * length);
  }

  /** Reserve an Int32 array holding a copy of `data`; returns its byte address. */
  i32From(data: Int32Array): number {
    const at = this.reserve(4 * data.length);
    this.copies.push({ at, data });
    return at;
  }

  /** Create the memory, copy the reserved arrays in and instantiate the kernels on it. */
  instantiate(): SparseLUKernels {
    const memory = new WebAssembly.Memory({ initial: Math.max(1, Math.ceil(this.size / PAGE)) });
    for (const c of this.copies) new Int32Array(memory.buffer, c.at, c.data.length).set(c.data);
    this.copies.length = 0;
    this.memory = memory;
    const instance = new WebAssembly.Instance(kernelModule(), { env: { memory } });
    return instance.exports as unknown as SparseLUKernels;
  }

  /** The memory's buffer (after `instantiate()`; the memory never grows, so views stay valid). */
  get buffer(): ArrayBuffer {
    if (this.memory === null) throw new Error("WasmArena: instantiate() first");
    return this.memory.buffer;
  }
}
