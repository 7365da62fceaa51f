import type { XY } from "../layout/types.js";
import { cellsOnSegment, gridOfRings, type EdgeGrid } from "./edgeGrid.js";
import { NO_CONTACT, TOUCH, orient, segmentContact } from "./orient.js";
import { signedArea } from "./rings.js";

/**
 * Fewer vertices for rings that bound a region on their left, cutting only into
 * the region: a run of vertices is replaced by the chord between its ends when
 * every vertex of the run lies on the chord or to its right (outside) and within
 * `toleranceM` of it, and the chord meets no other side of any ring (nor an
 * earlier chord). Greedy, run by run: the region loses at most a strip
 * `toleranceM` deep along its outline and gains nothing.
 *
 * Douglas-Peucker (layout/simplify.ts) is not used: it keeps the outline within
 * a tolerance on both sides, and here one side is unknown ground.
 */

/** Longest run replaced by one chord, vertices (bounds the cost per chord). */
const MAX_RUN = 256;

/**
 * The rings simplified inwards (see above); rings that would drop below three
 * vertices or turn over are left out (their region is given up, never grown).
 * @example
 * // A staircase of unit steps: two outer corners are cut off, no corner is filled in.
 * simplifyInward([[[0, 0], [3, 0], [3, 1], [2, 1], [2, 2], [1, 2], [1, 3], [0, 3]]], 1)
 * // [[[0, 0], [3, 1], [2, 1], [1, 2], [0, 3]]]
 */
export function simplifyInward(rings: readonly XY[][], toleranceM: number): XY[][] {
  if (!(toleranceM > 0)) return rings.map((r) => r.slice());
  const g = gridOfRings(rings);
  const dead = new Uint8Array(g.n);
  const chords = new Map<number, XY[]>(); // cell -> flat list of chord ends (pairs)
  const first: number[] = [];
  let base = 0;
  for (const r of rings) {
    first.push(base);
    base += r.length;
  }
  const out: XY[][] = [];
  rings.forEach((ring, ri) => {
    const n = ring.length;
    const kept: XY[] = [ring[0]];
    let i = 0;
    while (i < n) {
      let best = i + 1;
      for (let j = i + 2; j <= n && j - i <= MAX_RUN; j++) {
        if (!chordFits(ring, i, j, toleranceM)) break;
        if (!chordClear(g, dead, chords, ring[i], ring[j % n], first[ri], i, j, n)) break;
        best = j;
      }
      for (let e = i; e < best; e++) dead[first[ri] + e] = 1;
      addChord(g, chords, ring[i], ring[best % n]);
      if (best < n) kept.push(ring[best]);
      i = best;
    }
    const area = signedArea(kept);
    if (kept.length >= 3 && Math.sign(area) === Math.sign(signedArea(ring)) && area !== 0) out.push(kept);
  });
  return out;
}

/** Every vertex strictly between i and j lies on or right of the chord, within the tolerance. */
function chordFits(ring: readonly XY[], i: number, j: number, tol: number): boolean {
  const n = ring.length;
  const a = ring[i];
  const b = ring[j % n];
  const len = Math.hypot(b[0] - a[0], b[1] - a[1]);
  if (len === 0) return false;
  for (let m = i + 1; m < j; m++) {
    const p = ring[m];
    if (orient(a[0], a[1], b[0], b[1], p[0], p[1]) > 0) return false;
    const d = Math.abs((b[0] - a[0]) * (p[1] - a[1]) - (b[1] - a[1]) * (p[0] - a[0])) / len;
    if (d > tol) return false;
  }
  return true;
}

/** The chord meets no live side nor earlier chord, except at its own two ends. */
function chordClear(g: EdgeGrid, dead: Uint8Array, chords: Map<number, XY[]>, a: XY, b: XY, base: number, i: number, j: number, n: number): boolean {
  const out = new Float64Array(2);
  const ok = (kind: number) => kind === NO_CONTACT || (kind === TOUCH && (out[0] === 0 || out[0] === 1));
  const m = cellsOnSegment(g, a[0], a[1], b[0], b[1]);
  const cells = Array.from(g.cells.subarray(0, m));
  for (const cell of cells) {
    for (let q = g.start[cell]; q < g.start[cell + 1]; q++) {
      const e = g.items[q];
      if (dead[e]) continue;
      const local = e - base;
      // The run's own sides go; the two sides at its ends touch it there.
      if (local >= 0 && local < n && ((local >= i && local < j) || (j >= n && local < j - n))) continue;
      if (!ok(segmentContact(a[0], a[1], b[0], b[1], g.ax[e], g.ay[e], g.bx[e], g.by[e], out))) return false;
    }
    const list = chords.get(cell) ?? [];
    for (let q = 0; q < list.length; q += 2) {
      const c = list[q];
      const d = list[q + 1];
      if (!ok(segmentContact(a[0], a[1], b[0], b[1], c[0], c[1], d[0], d[1], out))) return false;
    }
  }
  return true;
}

function addChord(g: EdgeGrid, chords: Map<number, XY[]>, a: XY, b: XY): void {
  const m = cellsOnSegment(g, a[0], a[1], b[0], b[1]);
  for (let q = 0; q < m; q++) {
    const cell = g.cells[q];
    const list = chords.get(cell);
    if (list) list.push(a, b);
    else chords.set(cell, [a, b]);
  }
}
