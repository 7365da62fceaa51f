import { ensureMemory, kernelInstance, memoryPlan, type WasmMemory } from "../wasmKernel.js";
import type { GatherJob } from "./quantiles.js";

/**
 * The quantiles' second pass over the cells in WebAssembly (gatherCells.as.ts, built into
 * dist/assess/gatherCells.wasm by `npm run build`): one instance per thread and pass, its
 * memory holding a chunk of cells at a time and the values this thread gathered, each slot's
 * from the slot's start (GatherJob.slotAt); `flush` places them at this thread's end of each
 * slot of the job's `out` (thread 0 from the slot's start, thread 1 from its end), as
 * quantiles.ts gatherCells places them one by one.
 */
export interface GatherCells {
  /** Gathers from cells i0 .. i1 - 1 (at most `chunkCells` of them). */
  cells(i0: number, i1: number): void;
  /** Places the values gathered into the job's `out` at thread t's places, moving them on (`at`). */
  flush(t: number): void;
}

interface Exports {
  memory: WasmMemory;
  heapBase: () => number;
  chunk: (values: number, groups: number, include: number) => void;
  tables: (siteSlot: number, groupSlot: number, next: number, out: number) => void;
  figures: (lo: number, span: number, shift: number, fine: number, radix: number) => void;
  cells: (n: number) => void;
}

/** Where the kernel is, under dist/ (scripts/build-wasm.mjs). */
export const GATHER_CELLS_WASM = "assess/gatherCells.wasm";

/**
 * A new kernel instance for the pass `job` (its own memory, room for `chunkCells` cells), or
 * undefined without the compiled kernel (see wasmKernel): the pass then gathers in JavaScript.
 * `radixShift`: the site's first-pass bins' shift (quantiles.ts RADIX_SHIFT).
 * @example const k = gatherCells(job, 16384, 16); if (k) { k.cells(0, 16384); k.flush(0); }
 */
export function gatherCells(job: GatherJob, chunkCells: number, radixShift: number): GatherCells | undefined {
  const k = kernelInstance<Exports>(GATHER_CELLS_WASM);
  if (!k) return undefined;
  const { exports: x, base } = k;
  const { slots, slotAt } = job;
  const { place, end } = memoryPlan(base);
  const va = place(4 * chunkCells), gr = place(2 * chunkCells), inc = place(chunkCells);
  const ss = place(4 * job.siteSlot.length, job.siteSlot.length > 0);
  const gs = place(4 * job.groupSlot.length);
  const nx = place(4 * slots);
  const out = place(4 * slotAt[slots]);
  ensureMemory(x.memory, end());
  x.chunk(va, gr, inc);
  x.tables(ss, gs, nx, out);
  x.figures(job.lo, job.span, job.shift, job.siteFine ? 1 : 0, radixShift);
  const buf = x.memory.buffer;
  if (ss) new Int32Array(buf, ss, job.siteSlot.length).set(job.siteSlot);
  new Int32Array(buf, gs, job.groupSlot.length).set(job.groupSlot);
  const next = new Int32Array(buf, nx, slots);
  next.set(slotAt.subarray(0, slots));
  const gathered = new Float32Array(buf, out, slotAt[slots]);
  const values = new Float32Array(buf, va, chunkCells), groups = new Uint16Array(buf, gr, chunkCells), include = new Uint8Array(buf, inc, chunkCells);
  return {
    cells(i0, i1) {
      values.set(job.values.subarray(i0, i1));
      groups.set(job.group.subarray(i0, i1));
      include.set(job.include.subarray(i0, i1));
      x.cells(i1 - i0);
    },
    flush(t) {
      if (t > 1) throw new Error("gatherCells: two threads at most");
      const { at, out: into } = job;
      for (let s = 0; s < slots; s++) {
        const from = slotAt[s];
        const n = next[s] - from;
        if (n === 0) continue;
        // More than the slot holds: the first passes counted other values (gatherWanted refuses them).
        if (n > slotAt[s + 1] - from) throw new Error(`radix histograms do not match the values: slot ${s} counted ${slotAt[s + 1] - from}, found more`);
        const vals = gathered.subarray(from, from + n);
        if (t === 0) {
          into.set(vals, at[s]);
          at[s] += n;
        } else {
          into.set(vals, at[slots + s] - n + 1);
          at[slots + s] -= n;
        }
        next[s] = from;
      }
    },
  };
}
