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
  const isKnown = (i: number, j: number) => i >= 0 && j >= 0 && i < bw && j < bh && known[j * bw + i] === 1;
  // Up to two sides leave a corner; out[2v], out[2v + 1] hold their ends + 1.
  const out = new Int32Array(2 * vw * (bh + 1));
  const add = (i0: number, j0: number, i1: number, j1: number) => {
    const v = j0 * vw + i0;
    out[out[2 * v] === 0 ? 2 * v : 2 * v + 1] = j1 * vw + i1 + 1;
  };
  for (let j = 0; j < bh; j++) {
    for (let i = 0; i < bw; i++) {
      if (!isKnown(i, j)) continue;
      if (!isKnown(i, j - 1)) add(i, j, i + 1, j);
      if (!isKnown(i + 1, j)) add(i + 1, j, i + 1, j + 1);
      if (!isKnown(i, j + 1)) add(i + 1, j + 1, i, j + 1);
      if (!isKnown(i - 1, j)) add(i, j + 1, i, j);
    }
  }
  const rings: LatticeRing[] = [];
  const xy = (v: number): [number, number] => [v % vw, Math.floor(v / vw)];
  for (let s = 0; s < out.length; s++) {
    if (out[s] === 0) continue;
    const start = s >> 1;
    const ring: [number, number][] = [];
    let v = start;
    let slot = s;
    let prev = -1;
    for (;;) {
      const next = out[slot] - 1;
      out[slot] = 0;
      ring.push(xy(v));
      prev = v;
      v = next;
      if (v === start) break;
      slot = pickSide(out, v, prev, vw);
    }
    rings.push(dropStraight(ring));
  }
  return rings;
}

/** The unused side leaving corner v; of two, the left turn coming from prev. */
function pickSide(out: Int32Array, v: number, prev: number, vw: number): number {
  const a = 2 * v;
  if (out[a + 1] === 0) return a;
  if (out[a] === 0) return a + 1;
  const dx = (v % vw) - (prev % vw);
  const dy = Math.floor(v / vw) - Math.floor(prev / vw);
  const n0 = out[a] - 1;
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
