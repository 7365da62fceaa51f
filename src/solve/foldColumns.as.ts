// AssemblyScript (compiled to WebAssembly by `npm run build`, scripts/build-wasm.mjs; not
// part of the TypeScript build): zoneExtremaAxis.ts foldCoreCells for a leg along the grid's
// rows, each column's highest and lowest height over a band of rows and its count of nodata,
// four columns at a time in SIMD lanes.
//
// Why by hand: the fold reads every core cell of every east-west leg's band (~16 M cells at
// 4 km2, on the solve's thread); in JavaScript it took ~4 ns a cell, compute-bound, and no
// library folds a raster's columns this way.
//
// The results equal foldCoreCells's bit for bit (test/solve/zoneExtrema.test.ts, both ways
// against the per-station rectangle scan): each column takes its rows in the same order,
// and f32x4.pmax(m, z) is `m < z ? z : m`, foldCoreCells's `if (z > m) m = z`, which also
// leaves m as it was for a NaN z (as pmin does the minimum); NaN lanes are counted apart.
//
// Memory: the caller copies rows in (Float32, `cols4` a row, a multiple of four) at the
// address it sets with `arrays`, and reads the columns' maxima, minima (Float32) and nodata
// counts (Int32) from the addresses it sets there.

let IN: usize = 0;
let MX: usize = 0;
let MN: usize = 0;
let NC: usize = 0;

/** First free byte of memory (after this module's own data). */
export function heapBase(): usize {
  return __heap_base;
}

/** Where the rows and the columns' maxima, minima and nodata counts lie. */
export function arrays(rows: usize, max: usize, min: usize, nan: usize): void {
  IN = rows;
  MX = max;
  MN = min;
  NC = nan;
}

/** Starts the columns' folds: maxima -Infinity, minima Infinity, no nodata. */
export function start(cols4: i32): void {
  const lo = f32x4.splat(-Infinity);
  const hi = f32x4.splat(Infinity);
  const zero = i32x4.splat(0);
  for (let c = 0; c < cols4; c += 4) {
    const o = <usize>c << 2;
    v128.store(MX + o, lo);
    v128.store(MN + o, hi);
    v128.store(NC + o, zero);
  }
}

/** Folds the first n rows (cols4 values each) into the columns, row after row. */
export function fold(n: i32, cols4: i32): void {
  for (let r = 0; r < n; r++) {
    const row = IN + ((<usize>r * <usize>cols4) << 2);
    for (let c = 0; c < cols4; c += 4) {
      const o = <usize>c << 2;
      const z = v128.load(row + o);
      v128.store(MX + o, f32x4.pmax(v128.load(MX + o), z));
      v128.store(MN + o, f32x4.pmin(v128.load(MN + o), z));
      // A NaN lane compares unequal to itself: all ones, -1, subtracted.
      v128.store(NC + o, i32x4.sub(v128.load(NC + o), f32x4.ne(z, z)));
    }
  }
}
