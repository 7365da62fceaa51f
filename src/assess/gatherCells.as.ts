// AssemblyScript (compiled to WebAssembly by `npm run build`, scripts/build-wasm.mjs; not
// part of the TypeScript build): the quantiles' second pass over the cells, quantiles.ts
// gatherCells, gathering the same values.
//
// Why by hand: the pass reads every site cell again (16.6 M at 4 km2) to keep the few in the
// bins that hold the wanted ranks (~0.9 M); in JavaScript it took ~8 ns a cell, and no
// library gathers by such a table over rasters.
//
// Each slot's values are gathered here in cell order from the slot's start in this thread's
// own buffer; the caller then places them at the thread's end of the slot (quantiles.ts
// GatherJob). A rank's value does not depend on the order of a bin's values, so the
// quantiles equal those of gatherCells (test/assess/quantiles.test.ts, both ways against a sort).
//
// Memory: the caller copies a chunk of cells in (values Float32, groups Uint16, mask Uint8)
// at the addresses it sets with `chunk`; the slot tables (Int32), the slots' next places
// (Int32, in values from the buffer's start) and the buffer (Float32) at those it sets with
// `tables`.

let VA: usize = 0;
let GR: usize = 0;
let IN: usize = 0;
let SS: usize = 0;
let GS: usize = 0;
let NX: usize = 0;
let OUT: usize = 0;

let lo: i32 = 0;
let span: i32 = 0;
let shift: u32 = 0;
let radixShift: u32 = 0;
let site: bool = false;
let siteFine: bool = false;

/** First free byte of memory (after this module's own data). */
export function heapBase(): usize {
  return __heap_base;
}

/** Where a chunk's cells lie: values, groups, mask. */
export function chunk(values: usize, groups: usize, include: usize): void {
  VA = values;
  GR = groups;
  IN = include;
}

/** Where the site's slot by bin (0: no site), each group's slot by group and bin, the slots' next places and the values' buffer lie. */
export function tables(siteSlot: usize, groupSlot: usize, next: usize, out: usize): void {
  SS = siteSlot;
  GS = groupSlot;
  NX = next;
  OUT = out;
  site = siteSlot != 0;
}

/** The job's figures (GatherJob): the groups' first bin and span, their shift, the site's by the groups' bins or by the radix bins (shift `radix`). */
export function figures(first: i32, n: i32, groupShift: u32, fine: i32, radix: u32): void {
  lo = first;
  span = n;
  shift = groupShift;
  siteFine = fine != 0;
  radixShift = radix;
}

@inline
function keep(k: i32, bits: u32): void {
  const p = NX + (<usize>k << 2);
  const at = load<i32>(p);
  store<u32>(OUT + (<usize>at << 2), bits);
  store<i32>(p, at + 1);
}

/** gatherCells over the chunk's first n cells. */
export function cells(n: i32): void {
  for (let i = 0; i < n; i++) {
    const c = <usize>i;
    if (load<u8>(IN + c) == 0) continue;
    const v = load<f32>(VA + (c << 2));
    if (v != v) continue;
    const bits = load<u32>(VA + (c << 2));
    // float32SortKey: negative values all bits inverted, positive ones the sign bit set.
    const key: u32 = bits ^ (<u32>(<i32>bits >> 31) | 0x80000000);
    const b = <i32>(key >>> shift) - lo;
    const inSpan = b >= 0 && b < span;
    if (site) {
      const k = siteFine ? (inSpan ? load<i32>(SS + (<usize>b << 2)) : -1) : load<i32>(SS + (<usize>(key >>> radixShift) << 2));
      if (k >= 0) keep(k, bits);
    }
    if (inSpan) {
      const kg = load<i32>(GS + (<usize>(<i32>load<u16>(GR + (c << 1)) * span + b) << 2));
      if (kg >= 0) keep(kg, bits);
    }
  }
}
