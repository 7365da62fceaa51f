// AssemblyScript (compiled to WebAssembly by `npm run build`, scripts/build-wasm.mjs; not
// part of the TypeScript build): the constant-altitude comparison's image counts along one
// row of one strip, latticeCoverage.ts's countRow, and its pass over the cells of a band
// (below: plan/baseline.ts tallyRow).
//
// Why by hand: the comparison counts every site cell once per strip that can reach it (~60 M
// cell-strip visits on a 4 km2 site at 0.5 m, the largest part of its worker's time), and no
// library counts photo lattices over rasters. In JavaScript each visit took ~7 ns (typed-array
// checks, the engine's compiled loop recompiled per thread); here it is plain loads, compares
// and integer arithmetic.
//
// The counts equal countRow's exactly (test/assess/latticeRowsWasm.test.ts): the offsets along
// and across advance by the same additions, each test is the same float64 arithmetic (the
// lattice point k at s0 + k t, the reach (A - z) kAlong and kAcross), and the run of lattice
// points a cell sees is the unique one those tests define, whatever point the search starts
// from. The lattice points next to the run's ends are kept from cell to cell (countRow makes
// them again at each test), so most cells take four comparisons and no multiplication.
//
// Memory: the caller copies a band of cells in (ground heights Float32, site mask Uint8),
// the strips' prefix counts of photos taken (Int32) once, and reads the band's counts out
// (Uint16), at the addresses it sets with `arrays`; the pass's tallies lie where `tallies`
// says, read out once at the end.

let G: usize = 0;
let S: usize = 0;
let I: usize = 0;
let P: usize = 0;

/** First free byte of memory (after this module's own data). */
export function heapBase(): usize {
  return __heap_base;
}

/** Where the arrays lie: the band's ground, site mask and counts, and the prefix counts. */
export function arrays(ground: usize, inSite: usize, images: usize, pre: usize): void {
  G = ground;
  S = inSite;
  I = images;
  P = pre;
}

/**
 * countRow over band cells i0..i1 (inclusive, indices in the band): the strip's prefix counts
 * from entry `preAt`, its lattice s0 + k t for k in 0..n, photos at altitude A; the first
 * cell's offsets along a0 and across q0, stepping by da and dq per cell.
 */
export function row(i0: i32, i1: i32, preAt: i32, A: f64, a0: f64, q0: f64, da: f64, dq: f64, s0: f64, t: f64, n: i32, kAlong: f64, kAcross: f64): void {
  let a = a0;
  let q = q0;
  // Where the search starts: the lattice point nearest the first cell (any start gives the same runs).
  let start = Math.floor((a0 - s0) / t + 0.5);
  if (!(start >= 0)) start = 0;
  if (start > <f64>n) start = <f64>n;
  let kLo = <i32>start;
  let kHi = kLo - 1;
  // The lattice points either side of each end of the run, s0 + k t as countRow computes them
  // (made again only when an end moves; -Infinity and Infinity past the lattice's ends stand
  // for countRow's bounds on k).
  let below = kLo > 0 ? s0 + <f64>(kLo - 1) * t : -Infinity;
  let atLo = kLo <= n ? s0 + <f64>kLo * t : Infinity;
  let atHi = kHi >= 0 ? s0 + <f64>kHi * t : -Infinity;
  let above = kHi < n ? s0 + <f64>(kHi + 1) * t : Infinity;
  for (let i = i0; i <= i1; i++, a += da, q += dq) {
    if (load<u8>(S + <usize>i) == 0) continue;
    const d: f64 = A - <f64>load<f32>(G + (<usize>i << 2));
    // NaN ground (no data) fails here too.
    if (!(d > 0 && Math.abs(q) <= d * kAcross)) continue;
    const h = d * kAlong;
    const lo = a - h;
    const hi = a + h;
    // Lowest k with s_k >= lo, highest with s_k <= hi (s_k = s0 + k t increases with k).
    while (below >= lo) {
      kLo--;
      atLo = below;
      below = kLo > 0 ? s0 + <f64>(kLo - 1) * t : -Infinity;
    }
    while (atLo < lo) {
      kLo++;
      below = atLo;
      atLo = kLo <= n ? s0 + <f64>kLo * t : Infinity;
    }
    if (kHi < kLo - 1) {
      kHi = kLo - 1;
      atHi = below;
      above = atLo;
    }
    while (above <= hi) {
      kHi++;
      atHi = above;
      above = kHi < n ? s0 + <f64>(kHi + 1) * t : Infinity;
    }
    while (atHi > hi) {
      kHi--;
      above = atHi;
      atHi = kHi >= 0 ? s0 + <f64>kHi * t : -Infinity;
    }
    if (kHi < kLo) continue;
    const p = I + (<usize>i << 1);
    const c = <i32>load<u16>(p) + load<i32>(P + (<usize>(preAt + kHi + 1) << 2)) - load<i32>(P + (<usize>(preAt + kLo) << 2));
    store<u16>(p, c > 65535 ? 65535 : c);
  }
}

/** Where a strip's rows lie for `rows`: their first and last band cells (Int32 pairs) and first offsets along and across (Float64 pairs). */
let RI: usize = 0;
let RF: usize = 0;

export function rowArrays(ints: usize, floats: usize): void {
  RI = ints;
  RF = floats;
}

/**
 * `row` for n rows of one strip, in order: row k over band cells RI[2k]..RI[2k + 1] from the
 * offsets RF[2k], RF[2k + 1] (one call a strip and band from JavaScript, not one a row: each
 * call from the engine's lower tiers boxed its eight numbers).
 */
export function rows(n: i32, preAt: i32, A: f64, da: f64, dq: f64, s0: f64, t: f64, count: i32, kAlong: f64, kAcross: f64): void {
  for (let k = 0; k < n; k++) {
    const pi = RI + ((<usize>k) << 3);
    const pf = RF + ((<usize>k) << 4);
    row(load<i32>(pi), load<i32>(pi, 4), preAt, A, load<f64>(pf), load<f64>(pf, 8), da, dq, s0, t, count, kAlong, kAcross);
  }
}

// The comparison's pass over a band's cells (plan/baseline.ts tallyRow, its twin): with the
// band's counts made above, each site cell's GSD at the one altitude, flags, clearance
// shortfall, image-count and flag histograms, the seen cells' bits and the first radix pass
// of their ground, and their GSD tallied on the report's grid. The figures equal tallyRow's:
// the GSD is rounded to float32 from the same float64 product, every comparison is the same,
// and the histograms and counts are sums of whole numbers (their order does not matter).

let A: f64 = 0;
let gsdPerM: f64 = 0;
let bandLo: f64 = 0;
let bandHi: f64 = 0;
let clearanceM: f64 = 0;
let minImages: i32 = 0;
let byThreshold: bool = true;
let breachGsd: f64 = 0;
let ifov: f64 = 0;
let takeoffLimitM: f64 = 0;
let tallyBins: i32 = -1;
let tallyLo: f64 = 0;
let tallyHi: f64 = 0;
let tallyInv: f64 = 0;
let RG: usize = 0;
let IH: usize = 0;
let FH: usize = 0;
let TS: usize = 0;
let TE: usize = 0;
let SB: usize = 0;

/** Counts of the pass: site cells, seen, seen with ground, in band, above the ceiling, short of clearance; and the highest ground. */
let siteCells: f64 = 0;
let seen: f64 = 0;
let seenWithGround: f64 = 0;
let inBand: f64 = 0;
let breaches: f64 = 0;
let shortCells: f64 = 0;
let maxGround: f64 = -Infinity;

/**
 * The pass's figures and where its tallies lie: radix bins of the seen ground (u32 x 65536),
 * image counts (f64 x 65536), flag values (f64 x 512), the GSD tally's slots (f64 x bins + 2:
 * under, bins, over) and edges (f64 x bins + 1; bins -1: no tally), the seen cells' bits.
 * byTheThreshold: the ground and surface rules (a breach is a GSD at or above `breach`); else
 * the take-off rule (ground + GSD / 100 / ifov above `takeoffLimit`).
 */
export function tallies(
  altitude: f64, gsdPerMetre: f64, lo: f64, hi: f64, clearance: f64, fewBelow: i32,
  byTheThreshold: i32, breach: f64, ifovRad: f64, takeoffLimit: f64,
  bins: i32, radix: usize, imageHist: usize, flagHist: usize, slots: usize, edges: usize, seenBits: usize,
): void {
  A = altitude;
  gsdPerM = gsdPerMetre;
  bandLo = lo;
  bandHi = hi;
  clearanceM = clearance;
  minImages = fewBelow;
  byThreshold = byTheThreshold != 0;
  breachGsd = breach;
  ifov = ifovRad;
  takeoffLimitM = takeoffLimit;
  tallyBins = bins;
  RG = radix;
  IH = imageHist;
  FH = flagHist;
  TS = slots;
  TE = edges;
  SB = seenBits;
  if (bins > 0) {
    tallyLo = load<f64>(TE);
    tallyHi = load<f64>(TE + (<usize>bins << 3));
    tallyInv = <f64>bins / (tallyHi - tallyLo);
  }
  siteCells = 0;
  seen = 0;
  seenWithGround = 0;
  inBand = 0;
  breaches = 0;
  shortCells = 0;
  maxGround = -Infinity;
}

/** The pass's count k (the order of the list above: 0 site cells .. 5 short of clearance, 6 the highest ground). */
export function tallyCount(k: i32): f64 {
  return k == 0 ? siteCells : k == 1 ? seen : k == 2 ? seenWithGround : k == 3 ? inBand : k == 4 ? breaches : k == 5 ? shortCells : maxGround;
}

/** The GSD into the tally (BinCounter.add, gsdTally.ts): bin j holds edges[j] <= v < edges[j + 1]; NaN and infinities left out. */
function tallyAdd(v: f64): void {
  let at: usize;
  if (v < tallyLo) {
    if (!(v > -Infinity)) return;
    at = 0;
  } else if (v < tallyHi) {
    let b = <i32>((v - tallyLo) * tallyInv);
    if (b > tallyBins - 1) b = tallyBins - 1;
    if (v < load<f64>(TE + (<usize>b << 3))) b--;
    else if (v >= load<f64>(TE + (<usize>(b + 1) << 3))) b++;
    at = <usize>(b + 1);
  } else {
    if (!(v < Infinity)) return;
    at = <usize>(tallyBins + 1);
  }
  const p = TS + (at << 3);
  store<f64>(p, load<f64>(p) + 1);
}

/** tallyRow over the band's cells from .. end - 1, the band's cell 0 being the grid's cell `cellAt`. */
export function tallyBand(from: i32, end: i32, cellAt: i32): void {
  let byteAt: i32 = (cellAt + from) >> 3;
  let byte: i32 = 0;
  for (let i = from; i < end; i++) {
    if (load<u8>(S + <usize>i) == 0) continue;
    siteCells++;
    const c = <i32>load<u16>(I + (<usize>i << 1));
    const z = <f64>load<f32>(G + (<usize>i << 2));
    const g: f64 = c > 0 ? <f64><f32>((A - z) * gsdPerM) : NaN;
    if (z > maxGround) maxGround = z;
    if (A - z < clearanceM) shortCells++;
    if (c > 0) {
      seen++;
      const gi = cellAt + i;
      if (gi >> 3 != byteAt) {
        const p = SB + <usize>byteAt;
        store<u8>(p, load<u8>(p) | byte);
        byteAt = gi >> 3;
        byte = 0;
      }
      byte |= 1 << (gi & 7);
      if (z == z) {
        const u = load<u32>(G + (<usize>i << 2));
        const bin = ((u ^ ((<u32>(<i32>u >> 31)) | 0x80000000)) >>> 16);
        const p = RG + (<usize>bin << 2);
        store<u32>(p, load<u32>(p) + 1);
        seenWithGround++;
      }
      if (tallyBins > 0) tallyAdd(g);
    }
    // The assessment's flag bits (assess/flags.ts): 1 coarse, 2 fine, 4 too few images, 32 no data.
    let f: i32;
    if (z != z) f = 32;
    else {
      const p = IH + (<usize>c << 3);
      store<f64>(p, load<f64>(p) + 1);
      f = c < minImages ? 4 : 0;
      if (c > 0) {
        // NaN GSD counts as in the band, as the assessment counts it.
        const coarse = g > bandHi;
        const fine = !coarse && g < bandLo;
        f |= (coarse ? 1 : 0) | (fine ? 2 : 0);
        if (!(coarse || fine)) inBand++;
        if (byThreshold ? g >= breachGsd : z + g / 100 / ifov > takeoffLimitM) breaches++;
      }
    }
    const p = FH + (<usize>f << 3);
    store<f64>(p, load<f64>(p) + 1);
  }
  const p = SB + <usize>byteAt;
  store<u8>(p, load<u8>(p) | byte);
}
