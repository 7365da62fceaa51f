// AssemblyScript (compiled to WebAssembly by `npm run build`, scripts/build-wasm.mjs; not
// part of the TypeScript build): the rows of a Float32 DEM block with the floating-point
// predictor (TIFF predictor 3), as floatBlocks.ts floatPredictorRow32 does them for one
// sample per pixel, sixteen bytes at a time in 128-bit SIMD lanes.
//
// Why by hand: every cell of a DEM window read from such a file goes through this (21 M
// cells at 4 km2 and 0.5 m), no library does it, and in JavaScript each byte's running sum
// waits for the one before (~4 cycles a byte). Here a 16-byte vector's running sums take
// four shifted adds and the carry from the vector before one more, and four byte planes
// become sixteen words in a few shuffles.
//
// Integer arithmetic only, modulo 256 per byte as the predictor defines it: the results
// equal floatPredictorRow32's bit for bit (test/dem/floatRowsWasm.test.ts).

/** First free byte of memory (after this module's own data). */
export function heapBase(): usize {
  return __heap_base;
}

/**
 * Rows `rows` of a block `tw` samples wide starting at byte `src` (4 * tw bytes a row:
 * four byte planes, most significant first, each byte differenced from the one before
 * across the whole row): the differences summed in place, then samples c0..c1-1 of each
 * row written as little-endian 32-bit words, row after row, from `dst` (c1 - c0 words a row).
 * With `mark` not 0, a sample equal to `nodata` or not finite is written as NaN (the bits
 * 0x7fc00000 a Float32Array stores for NaN), as floatBlocks.ts markNodata does.
 */
export function floatRows(src: usize, tw: i32, rows: i32, c0: i32, c1: i32, dst: usize, mark: i32, nodata: f64): void {
  const rowBytes = <usize>(4 * tw);
  const n = <usize>(c1 - c0);
  for (let r = 0; r < rows; r++) {
    const o = src + <usize>r * rowBytes;
    const d = dst + <usize>r * n * 4;
    sumRow(o, rowBytes);
    planesToWords(o, <usize>tw, <usize>c0, n, d);
    if (mark != 0) markNodata(d, n, nodata);
  }
}

/** Samples at d .. d + 4n - 1 that equal `nodata` (compared as doubles) or are not finite, set to NaN. */
function markNodata(d: usize, n: usize, nodata: f64): void {
  for (let i: usize = 0; i < n; i++) {
    const p = d + (i << 2);
    const v = load<f32>(p);
    if (<f64>v == nodata || v - v != 0) store<u32>(p, 0x7fc00000);
  }
}

/** Running sums (modulo 256) of the bytes at o .. o + len - 1, in place. */
function sumRow(o: usize, len: usize): void {
  const zero = i8x16.splat(0);
  let carry = zero;
  let k: usize = 0;
  for (; k + 16 <= len; k += 16) {
    let v = v128.load(o + k);
    // Each byte plus the ones before it in the vector: shifts by 1, 2, 4 and 8 bytes.
    v = i8x16.add(v, i8x16.shuffle(zero, v, 15, 16, 17, 18, 19, 20, 21, 22, 23, 24, 25, 26, 27, 28, 29, 30));
    v = i8x16.add(v, i8x16.shuffle(zero, v, 14, 15, 16, 17, 18, 19, 20, 21, 22, 23, 24, 25, 26, 27, 28, 29));
    v = i8x16.add(v, i8x16.shuffle(zero, v, 12, 13, 14, 15, 16, 17, 18, 19, 20, 21, 22, 23, 24, 25, 26, 27));
    v = i8x16.add(v, i8x16.shuffle(zero, v, 8, 9, 10, 11, 12, 13, 14, 15, 16, 17, 18, 19, 20, 21, 22, 23));
    // Plus the sum of every byte before the vector (the last byte of the one before).
    v = i8x16.add(v, carry);
    v128.store(o + k, v);
    carry = i8x16.shuffle(v, v, 15, 15, 15, 15, 15, 15, 15, 15, 15, 15, 15, 15, 15, 15, 15, 15);
  }
  let acc: u32 = k > 0 ? <u32>load<u8>(o + k - 1) : 0;
  for (; k < len; k++) {
    acc = (acc + <u32>load<u8>(o + k)) & 255;
    store<u8>(o + k, <u8>acc);
  }
}

/** Samples c0 .. c0 + n - 1 of a row's four byte planes (tw bytes each, from o) as words at dst. */
function planesToWords(o: usize, tw: usize, c0: usize, n: usize, dst: usize): void {
  const o1 = o + tw;
  const o2 = o1 + tw;
  const o3 = o2 + tw;
  let i: usize = 0;
  for (; i + 16 <= n; i += 16) {
    const c = c0 + i;
    const p0 = v128.load(o + c);
    const p1 = v128.load(o1 + c);
    const p2 = v128.load(o2 + c);
    const p3 = v128.load(o3 + c);
    // A word's bytes in memory, least significant first: plane 3, 2, 1, 0.
    const lo32 = i8x16.shuffle(p3, p2, 0, 16, 1, 17, 2, 18, 3, 19, 4, 20, 5, 21, 6, 22, 7, 23);
    const hi32 = i8x16.shuffle(p1, p0, 0, 16, 1, 17, 2, 18, 3, 19, 4, 20, 5, 21, 6, 22, 7, 23);
    const lo32b = i8x16.shuffle(p3, p2, 8, 24, 9, 25, 10, 26, 11, 27, 12, 28, 13, 29, 14, 30, 15, 31);
    const hi32b = i8x16.shuffle(p1, p0, 8, 24, 9, 25, 10, 26, 11, 27, 12, 28, 13, 29, 14, 30, 15, 31);
    const d = dst + (i << 2);
    v128.store(d, i8x16.shuffle(lo32, hi32, 0, 1, 16, 17, 2, 3, 18, 19, 4, 5, 20, 21, 6, 7, 22, 23));
    v128.store(d + 16, i8x16.shuffle(lo32, hi32, 8, 9, 24, 25, 10, 11, 26, 27, 12, 13, 28, 29, 14, 15, 30, 31));
    v128.store(d + 32, i8x16.shuffle(lo32b, hi32b, 0, 1, 16, 17, 2, 3, 18, 19, 4, 5, 20, 21, 6, 7, 22, 23));
    v128.store(d + 48, i8x16.shuffle(lo32b, hi32b, 8, 9, 24, 25, 10, 11, 26, 27, 12, 13, 28, 29, 14, 15, 30, 31));
  }
  for (; i < n; i++) {
    const c = c0 + i;
    const w = (<u32>load<u8>(o + c) << 24) | (<u32>load<u8>(o1 + c) << 16) | (<u32>load<u8>(o2 + c) << 8) | <u32>load<u8>(o3 + c);
    store<u32>(dst + (i << 2), w);
  }
}
