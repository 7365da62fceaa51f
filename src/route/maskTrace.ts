/**
 * Known ground of a nodata mask as cell-boundary rings on a coarsened grid.
 *
 * The bilinear ground is known only inside a "quad", the square between four
 * neighbouring cell centres that all have data. A block of k x k quads counts
 * as known only when every centre it touches has data, so the traced region is
 * the known ground eroded to whole blocks: it never holds unknown ground, and
 * its outline has a vertex every k cells at most (fewer after merging straight runs).
 *
 * Traced by hand rather than with d3-contour: marching squares interpolates
 * between values and cuts corners diagonally, so its outline runs through
 * unknown quads at concave corners, and it places vertices on every cell side
 * anyway. Following block sides with the known side on the left gives exact
 * rings and their orientation for free.
 */

/** Rings in lattice coordinates: [i, j] are block corners (i along columns, j along rows). */
export type LatticeRing = [number, number][];

/** A coarsened known-ground grid. */
export interface BlockGrid {
  /** 1 where the block is known, row-major bw x bh. */
  known: Uint8Array;
  bw: number;
  bh: number;
  /** Centres per block side. */
  k: number;
}

/**
 * Blocks of k x k quads that are known throughout (the last row and column of
 * blocks may be narrower, ending at the last centres).
 * @example knownBlocks(Uint8Array.of(1, 1, 1, 1), 2, 2, 1).known // Uint8Array [1]
 */
export function knownBlocks(mask: Uint8Array, width: number, height: number, k: number): BlockGrid {
  const qw = width - 1;
  const qh = height - 1;
  const bw = qw > 0 ? Math.ceil(qw / k) : 0;
  const bh = qh > 0 ? Math.ceil(qh / k) : 0;
  const known = new Uint8Array(bw * bh);
  if (k === 1) {
    // One quad per block: known where the quad's four centres have data (one pass, no
    // per-block loops; the general case below gives the same). A row of blocks between
    // mask rows equal to the two before is the row before again (a DEM's edge or a
    // wide hole runs across many rows): copied.
    for (let bj = 0; bj < bh; bj++) {
      const a = bj * width, b = a + width, o = bj * bw;
      if (bj > 0 && sameRows(mask, a - width, a, width) && sameRows(mask, a, b, width)) {
        known.copyWithin(o, o - bw, o);
        continue;
      }
      let left = mask[a] !== 0 && mask[b] !== 0 ? 1 : 0;
      for (let bi = 0; bi < bw; bi++) {
        const right = mask[a + bi + 1] !== 0 && mask[b + bi + 1] !== 0 ? 1 : 0;
        known[o + bi] = left & right;
        left = right;
      }
    }
    return { known, bw, bh, k };
  }
  const colOk = new Uint8Array(width);
  for (let bj = 0; bj < bh; bj++) {
    const r0 = bj * k;
    const r1 = Math.min(r0 + k, qh);
    for (let c = 0; c < width; c++) {
      let ok = 1;
      for (let r = r0; r <= r1 && ok; r++) ok = mask[r * width + c] ? 1 : 0;
      colOk[c] = ok;
    }
    for (let bi = 0; bi < bw; bi++) {
      const c0 = bi * k;
      const c1 = Math.min(c0 + k, qw);
      let ok = 1;
      for (let c = c0; c <= c1 && ok; c++) ok = colOk[c];
      known[bj * bw + bi] = ok;
    }
  }
  return { known, bw, bh, k };
}

/**
 * Outline of the known blocks: rings along block sides with the known blocks on
 * the left in lattice coordinates (i to the right, j up), straight runs merged.
 * Where two known blocks meet only at a corner the rings turn left, so each
 * keeps its own ring and the unknown ground between them stays connected.
 * @example traceKnown({ known: Uint8Array.of(1), bw: 1, bh: 1, k: 1 }) // [[[0, 0], [1, 0], [1, 1], [0, 1]]]
 */
export function traceKnown(b: BlockGrid): LatticeRing[] {
  const { known, bw, bh } = b;
  const vw = bw + 1;
  // The sides with known ground on their left, in scan order: [from corner, to corner].
  // Kept sparse (a few per boundary block): a table of two slots per lattice corner
  // would hold mostly zeros on a large window and cost a pass over all of them.
  let from = new Int32Array(1024), to = new Int32Array(1024);
  let n = 0;
  const add = (v0: number, v1: number) => {
    if (n === from.length) {
      const f = new Int32Array(2 * n), t = new Int32Array(2 * n);
      f.set(from); t.set(to);
      from = f; to = t;
    }
    from[n] = v0;
    to[n++] = v1;
  };
  // Runs [start, end) of known blocks of the last row scanned block by block.
  let runs: number[] = [];
  for (let j = 0; j < bh; j++) {
    const row = j * bw;
    if (j > 0 && j + 1 < bh && sameRows(known, row - bw, row, bw) && sameRows(known, row, row + bw, bw)) {
      // Between two equal rows a row has sides only at its runs' ends (the rows above
      // and below it are known where it is), and the runs of the row before.
      for (let q = 0; q < runs.length; q += 2) {
        const a = j * vw + runs[q], b = j * vw + runs[q + 1] - 1;
        if (a !== b) add(a + vw, a);
        add(b + 1, b + 1 + vw);
        if (a === b) add(a + vw, a);
      }
      continue;
    }
    runs = [];
    for (let i = 0; i < bw; i++) {
      if (known[row + i] === 1 && (i === 0 || known[row + i - 1] !== 1)) runs.push(i);
      if (known[row + i] === 1 && (i + 1 === bw || known[row + i + 1] !== 1)) runs.push(i + 1);
    }
    for (let i = 0; i < bw; i++) {
      if (known[row + i] !== 1) continue;
      const up = j > 0 && known[row - bw + i] === 1;
      const right = i + 1 < bw && known[row + i + 1] === 1;
      const down = j + 1 < bh && known[row + bw + i] === 1;
      const left = i > 0 && known[row + i - 1] === 1;
      if (up && right && down && left) continue;
      const v = j * vw + i;
      if (!up) add(v, v + 1);
      if (!right) add(v + 1, v + 1 + vw);
      if (!down) add(v + 1 + vw, v + vw);
      if (!left) add(v + vw, v);
    }
  }
  // Sides by their start corner, in the order found (up to two leave a corner): the
  // order a table indexed by corner would visit them in.
  const SHIFT = 2 ** 26;
  if (n >= SHIFT || bh * vw + vw >= 2 ** 27) throw new Error("traceKnown: outline too long");
  const keys = new Float64Array(n);
  for (let e = 0; e < n; e++) keys[e] = from[e] * SHIFT + e;
  keys.sort();
  const sv = new Int32Array(n), st = new Int32Array(n);
  for (let e = 0; e < n; e++) {
    const v = Math.floor(keys[e] / SHIFT);
    sv[e] = v;
    st[e] = to[keys[e] - v * SHIFT];
  }
  const used = new Uint8Array(n);
  /** First side leaving corner v (sv is sorted). */
  const firstOf = (v: number): number => {
    let lo = 0, hi = n;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (sv[mid] < v) lo = mid + 1;
      else hi = mid;
    }
    return lo;
  };
  const rings: LatticeRing[] = [];
  const xy = (v: number): [number, number] => [v % vw, Math.floor(v / vw)];
  for (let s = 0; s < n; s++) {
    if (used[s]) continue;
    const start = sv[s];
    const ring: [number, number][] = [];
    let v = start;
    let slot = s;
    let prev = -1;
    for (;;) {
      const next = st[slot];
      used[slot] = 1;
      ring.push(xy(v));
      prev = v;
      v = next;
      if (v === start) break;
      slot = pickSide(sv, st, used, firstOf(v), v, prev, vw);
    }
    rings.push(dropStraight(ring));
  }
  return rings;
}

/** Whether a[i..i+n) equals a[j..j+n) (a native compare: rows are long). */
function sameRows(a: Uint8Array, i: number, j: number, n: number): boolean {
  const buf = Buffer.from(a.buffer, a.byteOffset, a.byteLength);
  return buf.compare(buf, j, j + n, i, i + n) === 0;
}

/** The unused side leaving corner v (its sides from index a on); of two, the left turn coming from prev. */
function pickSide(sv: Int32Array, st: Int32Array, used: Uint8Array, a: number, v: number, prev: number, vw: number): number {
  const second = a + 1 < sv.length && sv[a + 1] === v;
  if (!second || used[a + 1]) return a;
  if (used[a]) return a + 1;
  const dx = (v % vw) - (prev % vw);
  const dy = Math.floor(v / vw) - Math.floor(prev / vw);
  const n0 = st[a];
  const ex = (n0 % vw) - (v % vw);
  const ey = Math.floor(n0 / vw) - Math.floor(v / vw);
  return dx * ey - dy * ex > 0 ? a : a + 1;
}

function dropStraight(ring: [number, number][]): [number, number][] {
  const n = ring.length;
  return ring.filter((p, i) => {
    const a = ring[(i + n - 1) % n];
    const b = ring[(i + 1) % n];
    return (p[0] - a[0]) * (b[1] - p[1]) - (p[1] - a[1]) * (b[0] - p[0]) !== 0;
  });
}
