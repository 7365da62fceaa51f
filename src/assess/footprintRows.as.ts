// AssemblyScript (compiled to WebAssembly by `npm run build`, scripts/build-wasm.mjs; not
// part of the TypeScript build): the coverage sweep's footprint rows, coverageKernel.ts's
// sweepRow, two cells at a time in 128-bit SIMD lanes.
//
// Why by hand: the sweep visits every cell of every footprint (~200 M cell-photo pairs on a
// 4 km2 site at 0.5 m), and no library does this test-and-keep-the-best over rasters. In
// JavaScript each visit costs ~20 machine cycles (typed-array bounds and type checks, one
// branch per test); here the tests of two cells are made at once and combined without
// branches.
//
// The results equal sweepRow's bit for bit (test/assess/footprintRowsWasm.test.ts): every
// value is computed in float64 by the same operations in the same order (WebAssembly, like
// JavaScript, neither fuses a multiply and an add nor keeps extra precision), the offsets
// along and across are advanced one cell at a time by the same additions, and the Float32
// results are rounded from the same float64 values.
//
// Memory: the caller copies a band of cells in (ground heights Float32, site mask Uint8)
// and reads them out (image counts Uint16, GSD Float32, nadir strip Uint16), at the
// addresses it sets with `arrays`; `best` is the most nadir photo's measure per cell
// (Float32, Infinity to start).

let G: usize = 0;
let S: usize = 0;
let I: usize = 0;
let B: usize = 0;
let D: usize = 0;
let T: usize = 0;
let kAlong: f64 = 0;
let kAcross: f64 = 0;
let invKA2: f64 = 0;
let invKC2: f64 = 0;
let byDistance: bool = false;
let gsdPerM: f64 = 0;
let F: usize = 0;
let C: usize = 0;

/** First free byte of memory (after this module's own data). */
export function heapBase(): usize {
  return __heap_base;
}

/** Where the band's arrays lie: ground, site mask, images, best, GSD, nadir strip. */
export function arrays(ground: usize, inSite: usize, images: usize, best: usize, gsdCm: usize, nadirStrip: usize): void {
  G = ground;
  S = inSite;
  I = images;
  B = best;
  D = gsdCm;
  T = nadirStrip;
}

/** Where the band's effect flags (Uint16) and its seen cells per nadir strip (Int32) lie, for `effects`. */
export function effectArrays(flags: usize, seen: usize): void {
  F = flags;
  C = seen;
}

/**
 * coverageKernel.ts bandEffects over the band's first n cells, once its photos are all
 * counted: each site cell's effect flags (`nodata` where the ground has none; else `coarse`
 * above `hi`, `fine` below `lo`, `few` under minImages images; 0 outside the site), and the
 * seen site cells counted by nadir strip (added to what `seen` holds).
 */
export function effects(n: i32, lo: f64, hi: f64, minImages: f64, nodata: u16, coarse: u16, fine: u16, few: u16): void {
  let runStrip: i32 = 0;
  let run: i32 = 0;
  for (let i = 0; i < n; i++) {
    const k = <usize>i;
    if (load<u8>(S + k) == 0) {
      store<u16>(F + (k << 1), 0);
      continue;
    }
    const g = <f64>load<f32>(D + (k << 2));
    if (g == g) {
      const s = <i32>load<u16>(T + (k << 1));
      if (s != runStrip) {
        const p = C + (<usize>runStrip << 2);
        store<i32>(p, load<i32>(p) + run);
        runStrip = s;
        run = 0;
      }
      run++;
    }
    const z = load<f32>(G + (k << 2));
    if (z != z) {
      store<u16>(F + (k << 1), nodata);
      continue;
    }
    let f: u16 = 0;
    if (g > hi) f |= coarse;
    else if (g < lo) f |= fine;
    if (<f64>load<u16>(I + (k << 1)) < minImages) f |= few;
    store<u16>(F + (k << 1), f);
  }
  const p = C + (<usize>runStrip << 2);
  store<i32>(p, load<i32>(p) + run);
}

/** The camera's figures, as sweepRow takes them (byDistance: nonzero for the "distance" measure). */
export function camera(ka: f64, kc: f64, ika2: f64, ikc2: f64, distance: i32, gsdPerMetre: f64): void {
  kAlong = ka;
  kAcross = kc;
  invKA2 = ika2;
  invKC2 = ikc2;
  byDistance = distance != 0;
  gsdPerM = gsdPerMetre;
}

/** Where a photo's rows lie for `rows`: their first and last band cells (Int32 pairs) and first offsets along and across (Float64 pairs). */
let RI: usize = 0;
let RF: usize = 0;

export function rowArrays(ints: usize, floats: usize): void {
  RI = ints;
  RF = floats;
}

/**
 * `row` for n rows of one photo, in order: row k over band cells RI[2k]..RI[2k + 1] from the
 * offsets RF[2k], RF[2k + 1] (one call a photo from JavaScript, not one a row: each call
 * from the engine's lower tiers boxed its five numbers, ~80 bytes of garbage a row).
 */
export function rows(n: i32, ez: f64, da: f64, dq: f64, strip: i32): void {
  for (let k = 0; k < n; k++) {
    const pi = RI + ((<usize>k) << 3);
    const pf = RF + ((<usize>k) << 4);
    row(load<i32>(pi), load<i32>(pi, 4), ez, load<f64>(pf), load<f64>(pf, 8), da, dq, strip);
  }
}

/**
 * One row of one footprint: band cells i0..i1 (inclusive), offsets along and across of the
 * first a0 / q0, stepping by da / dq per cell; the photo at altitude ez of strip `strip`.
 */
export function row(i0: i32, i1: i32, ez: f64, a0: f64, q0: f64, da: f64, dq: f64, strip: i32): void {
  let a = a0;
  let q = q0;
  const ezv = f64x2.splat(ez);
  const kav = f64x2.splat(kAlong);
  const kcv = f64x2.splat(kAcross);
  const ika = f64x2.splat(invKA2);
  const ikc = f64x2.splat(invKC2);
  const gpm = f64x2.splat(gsdPerM);
  const zero = f64x2.splat(0);
  const one = f64x2.splat(1);
  const strip2: u32 = (<u32>strip & 0xffff) | ((<u32>strip & 0xffff) << 16);
  let i = i0;
  for (; i < i1; i += 2) {
    // The offsets of cells i and i + 1, advanced as sweepRow advances them (a += da per cell).
    const a1 = a + da;
    const q1 = q + dq;
    const av = f64x2.replace_lane(f64x2.splat(a), 1, a1);
    const qv = f64x2.replace_lane(f64x2.splat(q), 1, q1);
    a = a1 + da;
    q = q1 + dq;
    const k = <usize>i;
    const d = f64x2.sub(ezv, f64x2.promote_low_f32x4(v128.load64_zero(G + (k << 2))));
    // The two site-mask bytes, one per 64-bit lane.
    const site = i64x2.extend_low_i32x4_u(i32x4.extend_low_i16x8_u(i16x8.extend_low_i8x16_u(v128.load16_splat(S + k))));
    // NaN ground (no data) fails every comparison, as in sweepRow.
    const inside = v128.and(
      v128.and(f64x2.le(f64x2.abs(av), f64x2.mul(d, kav)), f64x2.le(f64x2.abs(qv), f64x2.mul(d, kcv))),
      v128.and(f64x2.gt(d, zero), v128.not(i64x2.eq(site, i64x2.splat(0)))),
    );
    const seen = i64x2.bitmask(inside);
    if (seen == 0) continue;
    // Both image counts as one word, each raised by one where seen and below 65535.
    const w = load<u32>(I + (k << 1));
    let inc: u32 = (seen & 1) | ((seen & 2) << 15);
    if ((w & 0xffff) == 0xffff) inc &= 0xffff0000;
    if (w >>> 16 == 0xffff) inc &= 0xffff;
    store<u32>(I + (k << 1), w + inc);
    const num = f64x2.add(f64x2.mul(f64x2.mul(av, av), ika), f64x2.mul(f64x2.mul(qv, qv), ikc));
    const d2 = byDistance ? one : f64x2.mul(d, d);
    const bestOld = v128.load64_zero(B + (k << 2));
    const better = v128.and(f64x2.lt(num, f64x2.mul(f64x2.promote_low_f32x4(bestOld), d2)), inside);
    const won = i64x2.bitmask(better);
    if (won == 0) continue;
    // The lanes' masks narrowed to the two Float32 lanes written back.
    const m32 = i8x16.shuffle(better, better, 0, 1, 2, 3, 8, 9, 10, 11, 0, 1, 2, 3, 8, 9, 10, 11);
    v128.store64_lane(B + (k << 2), v128.bitselect(f32x4.demote_f64x2_zero(f64x2.div(num, d2)), bestOld, m32), 0);
    v128.store64_lane(D + (k << 2), v128.bitselect(f32x4.demote_f64x2_zero(f64x2.mul(d, gpm)), v128.load64_zero(D + (k << 2)), m32), 0);
    const keep: u32 = (won & 1 ? 0 : 0xffff) | (won & 2 ? 0 : 0xffff0000);
    store<u32>(T + (k << 1), (load<u32>(T + (k << 1)) & keep) | (strip2 & ~keep));
  }
  if (i == i1) {
    // An odd last cell, as sweepRow does it.
    const k = <usize>i;
    const d = ez - <f64>load<f32>(G + (k << 2));
    if (!(Math.abs(a) <= d * kAlong && Math.abs(q) <= d * kAcross && d > 0) || load<u8>(S + k) == 0) return;
    const c = load<u16>(I + (k << 1));
    if (c < 65535) store<u16>(I + (k << 1), c + 1);
    const num = a * a * invKA2 + q * q * invKC2;
    const d2 = byDistance ? 1.0 : d * d;
    if (num < <f64>load<f32>(B + (k << 2)) * d2) {
      store<f32>(B + (k << 2), <f32>(num / d2));
      store<f32>(D + (k << 2), <f32>(d * gsdPerM));
      store<u16>(T + (k << 1), <u16>strip);
    }
  }
}
