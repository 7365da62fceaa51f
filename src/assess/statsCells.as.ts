// AssemblyScript (compiled to WebAssembly by `npm run build`, scripts/build-wasm.mjs; not
// part of the TypeScript build): the statistics' pass over the cells, stats.ts
// statsPassCells, the same counts.
//
// Why by hand: the pass reads every site cell (16.6 M at 4 km2) and counts it in five
// histograms; in JavaScript it took ~15 ns a cell (0.25 s on one thread at 4 km2), the most
// of the statistics' time, and no library counts such tallies over rasters. Here the cells'
// values are read without the engine's bounds and type checks.
//
// Every count is a whole number, so the counts equal statsPassCells's exactly whatever the
// order (test/assess/statsCellsWasm.test.ts); the tally's bin is found by BinCounter.slotOf's
// own steps, in float64, from the same edges and the same inverse step.
//
// Memory: the caller copies a chunk of cells in (GSD Float32, ground Float32, image counts
// Uint16, nadir strips Uint16, flags Uint16, site mask Uint8) at the addresses it sets with
// `chunk`; the counts (Uint32) lie at the addresses it sets with `counts`, zero to start, and
// are read out by the caller at the end of its bands.

let GS: usize = 0;
let GR: usize = 0;
let IM: usize = 0;
let ST: usize = 0;
let FL: usize = 0;
let SI: usize = 0;

let IH: usize = 0;
let FH: usize = 0;
let BS: usize = 0;
let RH: usize = 0;
let SH: usize = 0;
let SB: usize = 0;
let SA: usize = 0;
let TS: usize = 0;
let TE: usize = 0;
let TM: usize = 0;

let flagValues: i32 = 0;
let bandMask: u32 = 0;
let radixShift: u32 = 0;
let stripShift: u32 = 0;
let spanLo: i32 = 0;
let span: i32 = 0;
let atLeastCm: f64 = 0;
let atLeast: u32 = 0;
let tLo: f64 = 0;
let tHi: f64 = 0;
let tInv: f64 = 0;
let tLast: i32 = 0;
let tOver: i32 = 0;

/** First free byte of memory (after this module's own data). */
export function heapBase(): usize {
  return __heap_base;
}

/** Where a chunk's cells lie: GSD, ground, images, nadir strips, flags, site mask. */
export function chunk(gsd: usize, ground: usize, images: usize, strip: usize, flags: usize, inSite: usize): void {
  GS = gsd;
  GR = ground;
  IM = images;
  ST = strip;
  FL = flags;
  SI = inSite;
}

/**
 * Where the counts lie: images (65 536), strip x flag value, strip in band, radix bins, each
 * strip's finer bins, below and above them (0: no strips' bins), the tally (0: none), its
 * edges (Float64) and the strip bins' tally entries (Int32; 0: none).
 */
export function counts(images: usize, flags: usize, inBand: usize, radix: usize, strips: usize, below: usize, above: usize, tally: usize, edges: usize, tallyOfStripBin: usize): void {
  IH = images;
  FH = flags;
  BS = inBand;
  RH = radix;
  SH = strips;
  SB = below;
  SA = above;
  TS = tally;
  TE = edges;
  TM = tallyOfStripBin;
}

/** The pass's figures: flag values per strip, the in-band test's bits, the radix and strip-bin shifts, the strips' span, the GSD counted from. */
export function figures(values: i32, inBandBits: u32, radix: u32, stripBins: u32, lo: i32, n: i32, atLeast: f64): void {
  flagValues = values;
  bandMask = inBandBits;
  radixShift = radix;
  stripShift = stripBins;
  spanLo = lo;
  span = n;
  atLeastCm = atLeast;
}

/** The tally's counter (gsdTally.ts BinCounter at 0): first and last edge, inverse step, last bin, the entry above. */
export function tallyFigures(lo: f64, hi: f64, inv: f64, last: i32, over: i32): void {
  tLo = lo;
  tHi = hi;
  tInv = inv;
  tLast = last;
  tOver = over;
}

/** Seen cells with a GSD of at least the figure's, counted so far; and set back to 0. */
export function takeAtLeast(): u32 {
  const n = atLeast;
  atLeast = 0;
  return n;
}

/** BinCounter.add: the entry of v (under, bins, over; none for the infinities and NaN) raised by one. */
@inline
function tallyAdd(v: f64): void {
  if (v < tLo) {
    if (v > -Infinity) bump(TS, 0);
    return;
  }
  if (v < tHi) {
    let b = <i32>((v - tLo) * tInv);
    if (b > tLast) b = tLast;
    if (v < load<f64>(TE + (<usize>b << 3))) b--;
    else if (v >= load<f64>(TE + (<usize>(b + 1) << 3))) b++;
    bump(TS, 1 + b);
    return;
  }
  if (v < Infinity) bump(TS, tOver);
}

@inline
function bump(at: usize, k: i32): void {
  const p = at + (<usize>k << 2);
  store<u32>(p, load<u32>(p) + 1);
}

@inline
function add(at: usize, k: i32, n: u32): void {
  const p = at + (<usize>k << 2);
  store<u32>(p, load<u32>(p) + n);
}

/** statsPassCells over the chunk's first n cells. */
export function cells(n: i32): void {
  let imageAt: i32 = 0, imageRun: u32 = 0;
  let flagAt: i32 = 0, flagRun: u32 = 0;
  let radixAt: i32 = 0, radixRun: u32 = 0;
  let inBandAt: i32 = 0, inBandRun: u32 = 0;
  let seenAtLeast: u32 = 0;
  const strips = SH != 0;
  const tally = TS != 0;
  const mapped = TM != 0;
  for (let i = 0; i < n; i++) {
    const c = <usize>i;
    if (load<u8>(SI + c) == 0) continue;
    const z = load<f32>(GR + (c << 2));
    if (z == z) {
      const k = <i32>load<u16>(IM + (c << 1));
      if (k == imageAt) imageRun++;
      else {
        add(IH, imageAt, imageRun);
        imageAt = k;
        imageRun = 1;
      }
    }
    const s = <i32>load<u16>(ST + (c << 1));
    const f = <i32>load<u16>(FL + (c << 1));
    const fk = s * flagValues + f;
    if (fk == flagAt) flagRun++;
    else {
      add(FH, flagAt, flagRun);
      flagAt = fk;
      flagRun = 1;
    }
    const bits = load<u32>(GS + (c << 2));
    const g = <f64>load<f32>(GS + (c << 2));
    if (g != g) continue;
    // float32SortKey: negative values all bits inverted, positive ones the sign bit set.
    const key: u32 = bits ^ (<u32>(<i32>bits >> 31) | 0x80000000);
    const bin = <i32>(key >>> radixShift);
    if (bin == radixAt) radixRun++;
    else {
      add(RH, radixAt, radixRun);
      radixAt = bin;
      radixRun = 1;
    }
    if (strips) {
      const b = <i32>(key >>> stripShift) - spanLo;
      if (b < 0) {
        bump(SB, s);
        if (tally) tallyAdd(g);
      } else if (b >= span) {
        bump(SA, s);
        if (tally) tallyAdd(g);
      } else {
        bump(SH, s * span + b);
        if (tally && (!mapped || load<i32>(TM + (<usize>b << 2)) < 0)) tallyAdd(g);
      }
    } else if (tally) tallyAdd(g);
    if ((<u32>f & bandMask) == 0) {
      if (s == inBandAt) inBandRun++;
      else {
        add(BS, inBandAt, inBandRun);
        inBandAt = s;
        inBandRun = 1;
      }
    }
    if (g >= atLeastCm) seenAtLeast++;
  }
  add(IH, imageAt, imageRun);
  add(FH, flagAt, flagRun);
  add(RH, radixAt, radixRun);
  add(BS, inBandAt, inBandRun);
  atLeast += seenAtLeast;
}
