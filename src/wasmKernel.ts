import { readFileSync } from "node:fs";
import { join } from "node:path";
import { packageRoot } from "./packageRoot.js";
import { LITTLE_ENDIAN_HOST } from "./hostEndian.js";

/**
 * The WebAssembly kernels `npm run build` compiles into dist/ (scripts/build-wasm.mjs, from
 * the files of src/ named *.as.ts), found from the package root so that the tests (run from
 * src/), dist/ and the bundle (dist/bundle/) read the same file. Each is compiled once per
 * thread that asks.
 */

/** The engine's WebAssembly API, as much of it as is used here (the compiler's ES2022 library declares none). */
interface WasmApi {
  Module: new (bytes: Uint8Array) => WasmModule;
  Instance: new (module: WasmModule, imports: object) => { exports: unknown };
}

/** A compiled module (opaque). */
export type WasmModule = object;

/** A kernel's memory, as its exports give it. */
export interface WasmMemory {
  buffer: ArrayBuffer;
  grow: (pages: number) => number;
}

const WebAssembly = (globalThis as unknown as { WebAssembly: WasmApi }).WebAssembly;

/** Bytes of a WebAssembly memory page. */
export const WASM_PAGE = 65536;

const compiled = new Map<string, WasmModule | null>();

/**
 * The compiled kernel at `file` under dist/ ("assess/footprintRows.wasm"), or null where it
 * cannot be had (not built, an engine without WebAssembly SIMD, or a big-endian machine): its
 * caller then runs its JavaScript twin.
 * @example const m = wasmKernel("dem/floatRows.wasm"); if (m) wasmInstance<{ heapBase: () => number }>(m).heapBase();
 */
export function wasmKernel(file: string): WasmModule | null {
  let m = compiled.get(file);
  if (m !== undefined) return m;
  try {
    // WebAssembly memory is little-endian everywhere; the callers read it through host-order typed arrays.
    if (!LITTLE_ENDIAN_HOST) throw new Error("big-endian host");
    m = new WebAssembly.Module(readFileSync(join(packageRoot(), "dist", file)));
  } catch {
    m = null;
  }
  compiled.set(file, m);
  return m;
}

/**
 * A new instance of a compiled kernel (its own memory): its exports, typed by the caller.
 * @example const x = wasmInstance<{ memory: WasmMemory; heapBase: () => number }>(module);
 */
export function wasmInstance<T>(module: WasmModule): T {
  return new WebAssembly.Instance(module, {}).exports as T;
}

/**
 * A new instance of the kernel at `file` (see wasmKernel) with the first free byte of its
 * memory after its own data, 16-byte aligned; undefined where the kernel cannot be had.
 * @example const k = kernelInstance<Exports>("dem/floatRows.wasm"); if (k) k.exports.floatRows(k.base, ...)
 */
export function kernelInstance<T extends { heapBase: () => number }>(file: string): { exports: T; base: number } | undefined {
  const module = wasmKernel(file);
  if (!module) return undefined;
  const exports = wasmInstance<T>(module);
  return { exports, base: align16(exports.heapBase()) };
}

/**
 * Grows `memory` to hold at least `bytes` bytes.
 * @example ensureMemory(x.memory, end)
 */
export function ensureMemory(memory: WasmMemory, bytes: number): void {
  const have = memory.buffer.byteLength;
  if (bytes > have) memory.grow(Math.ceil((bytes - have) / WASM_PAGE));
}

/** `n` rounded up to a multiple of 16 (a SIMD vector's bytes). */
export const align16 = (n: number): number => (n + 15) & ~15;

/**
 * Places arrays in a kernel's memory one after another from `base`, each 16-byte aligned:
 * `place(bytes)` gives the next one's address, or 0 when it is not `wanted` (the kernels read
 * address 0 as "none"); `end()` the first byte after them all (for ensureMemory).
 * @example const m = memoryPlan(base); const a = m.place(4 * n), b = m.place(n, hasMask); ensureMemory(x.memory, m.end());
 */
export function memoryPlan(base: number): { place: (bytes: number, wanted?: unknown) => number; end: () => number } {
  let at = base;
  return {
    place(bytes, wanted = true) {
      if (!wanted) return 0;
      const p = at;
      at = align16(at + bytes);
      return p;
    },
    end: () => at,
  };
}
