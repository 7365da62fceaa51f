// AssemblyScript (compiled to WebAssembly by `npm run build`, scripts/build-wasm.mjs; not
// part of the TypeScript build): the report maps' block reduction, downsample.ts
// reduceRasters and meanBlocks, one row of blocks at a time.
//
// Why by hand: the reduction reads every cell of the plan's rasters (16.6 M at 4 km2) and
// of the DEM window; in JavaScript it took ~9 ns a cell over the four rasters, the most of
// the maps' worker's time, and no library reduces blocks by these rules (the flags' OR, the
// least in-site image count, the mean of the finite values).
//
// The results equal downsample.ts's bit for bit (test/report/downsample.test.ts): each
// block adds its finite values in the same order (row by row, left to right, in float64),
// divides once and rounds to float32; the rest are whole numbers.
//
// Memory: the caller copies a block row's input rows in (GSD Float32, image counts Uint16,
// flags Uint16, site mask Uint8, heights Float32; any of them absent: address 0) at the
// addresses it sets with `inputs`, and reads one output row per raster (flags Uint16, site
// Uint8, image counts Uint16, GSD Float32, heights Float32) from those it sets with
// `outputs`; the accumulators lie from the address it sets with `scratch` (w blocks: 36
// bytes each).

let GS: usize = 0;
let IM: usize = 0;
let FL: usize = 0;
let SI: usize = 0;
let Z: usize = 0;
let OF: usize = 0;
let OS: usize = 0;
let OI: usize = 0;
let OG: usize = 0;
let OZ: usize = 0;
let AF: usize = 0;
let AA: usize = 0;
let AM: usize = 0;
let AS: usize = 0;
let AC: usize = 0;
let ZS: usize = 0;
let ZC: usize = 0;

/** First free byte of memory (after this module's own data). */
export function heapBase(): usize {
  return __heap_base;
}

/** Where the input rows lie: GSD, image counts, flags, site mask, heights (0: none). */
export function inputs(gsd: usize, images: usize, flags: usize, inSite: usize, heights: usize): void {
  GS = gsd;
  IM = images;
  FL = flags;
  SI = inSite;
  Z = heights;
}

/** Where the output row lies: flags, site, image counts, GSD, heights. */
export function outputs(flags: usize, inSite: usize, images: usize, gsd: usize, heights: usize): void {
  OF = flags;
  OS = inSite;
  OI = images;
  OG = gsd;
  OZ = heights;
}

/** Where the accumulators of `w` block columns start (36 bytes a block, 8-byte aligned). */
export function scratch(at: usize, w: i32): void {
  const n = <usize>w;
  AS = at;
  ZS = AS + (n << 3);
  AF = ZS + (n << 3);
  AM = AF + (n << 2);
  AC = AM + (n << 2);
  ZC = AC + (n << 2);
  AA = ZC + (n << 2);
}

/** The input's first `rows` rows of W cells, in blocks of k columns (w of them): one output row. */
export function blockRow(rows: i32, W: i32, k: i32, w: i32): void {
  for (let bc = 0; bc < w; bc++) {
    const b = <usize>bc;
    store<i32>(AF + (b << 2), 0);
    store<u8>(AA + b, 0);
    store<i32>(AM + (b << 2), 65535);
    store<f64>(AS + (b << 3), 0);
    store<i32>(AC + (b << 2), 0);
    store<f64>(ZS + (b << 3), 0);
    store<i32>(ZC + (b << 2), 0);
  }
  for (let r = 0; r < rows; r++) {
    const base = <usize>(r * W);
    let c = 0;
    for (let bc = 0; bc < w; bc++) {
      const b = <usize>bc;
      const end = min(W, c + k);
      if (FL) {
        let f = load<i32>(AF + (b << 2));
        for (let j = c; j < end; j++) f |= <i32>load<u16>(FL + ((base + <usize>j) << 1));
        store<i32>(AF + (b << 2), f);
      }
      if (SI) {
        let a = load<u8>(AA + b);
        let m = load<i32>(AM + (b << 2));
        for (let j = c; j < end; j++) {
          const i = base + <usize>j;
          if (load<u8>(SI + i) == 0) continue;
          a = 1;
          const im = <i32>load<u16>(IM + (i << 1));
          if (im < m) m = im;
        }
        store<u8>(AA + b, a);
        store<i32>(AM + (b << 2), m);
      }
      if (GS) finiteSum(GS, base, c, end, AS + (b << 3), AC + (b << 2));
      if (Z) finiteSum(Z, base, c, end, ZS + (b << 3), ZC + (b << 2));
      c = end;
    }
  }
  for (let bc = 0; bc < w; bc++) {
    const b = <usize>bc;
    const any = load<u8>(AA + b);
    if (FL) store<u16>(OF + (b << 1), <u16>load<i32>(AF + (b << 2)));
    if (SI) {
      store<u8>(OS + b, any);
      store<u16>(OI + (b << 1), any ? <u16>load<i32>(AM + (b << 2)) : 0);
    }
    if (GS) {
      const n = load<i32>(AC + (b << 2));
      store<f32>(OG + (b << 2), n ? <f32>(load<f64>(AS + (b << 3)) / <f64>n) : NaN);
    }
    if (Z) {
      const n = load<i32>(ZC + (b << 2));
      store<f32>(OZ + (b << 2), n ? <f32>(load<f64>(ZS + (b << 3)) / <f64>n) : NaN);
    }
  }
}

/** The finite values of cells c .. end - 1 of the row at `base` added, left to right, to the block's sum and count. */
@inline
function finiteSum(v: usize, base: usize, c: i32, end: i32, sumAt: usize, cntAt: usize): void {
  let s = load<f64>(sumAt);
  let m = load<i32>(cntAt);
  for (let j = c; j < end; j++) {
    const x = <f64>load<f32>(v + ((base + <usize>j) << 2));
    if (x == x) {
      s += x;
      m++;
    }
  }
  store<f64>(sumAt, s);
  store<i32>(cntAt, m);
}
