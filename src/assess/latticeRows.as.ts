// AssemblyScript (compiled to WebAssembly by `npm run build`, scripts/build-wasm.mjs; not
// part of the TypeScript build): the constant-altitude comparison's image counts along one
// row of one strip, latticeCoverage.ts's countRow.
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
// (Uint16), at the addresses it sets with `arrays`.

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
