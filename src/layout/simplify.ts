/**
 * Douglas-Peucker simplification of closed rings in a metric frame
 * (Douglas and Peucker, "Algorithms for the reduction of the number of points
 * required to represent a digitized line or its caricature", The Canadian
 * Cartographer 10(2), 1973).
 *
 * Written here rather than taken from turf's `simplify` (simplify-js) because
 * that one recurses once per split: on a long smooth arc every split peels off
 * a few points, so the call depth grows with the vertex count and a cadastre
 * parcel of some 10^5 vertices overflows the stack. This version keeps the
 * pending spans on an explicit stack of typed arrays.
 */

/**
 * Indices of the vertices kept when an open ring (no closing repeat) is
 * simplified so that no dropped vertex lies farther than `toleranceM` from the
 * kept outline. The ring is split at its first vertex and the vertex farthest
 * from it, and each half is simplified on its own, so the result stays closed
 * and keeps the ring's extent. Always keeps at least those two anchors and one
 * vertex of each half that has any (a ring never collapses below a triangle
 * when it had one). Sorted ascending.
 * @example
 * // A square with a slightly bent edge: the bend (0.01 m) goes at 0.05 m.
 * simplifyRingIndices(Float64Array.of(0, 5, 10, 10, 0), Float64Array.of(0, 0.01, 0, 10, 10), 0.05) // Uint32Array [0, 2, 3, 4]
 */
export function simplifyRingIndices(xs: Float64Array, ys: Float64Array, toleranceM: number): Uint32Array {
  const n = xs.length;
  if (n <= 3 || !(toleranceM > 0)) return Uint32Array.from({ length: n }, (_, i) => i);
  let far = 0;
  let farD = -1;
  for (let i = 1; i < n; i++) {
    const d = (xs[i] - xs[0]) ** 2 + (ys[i] - ys[0]) ** 2;
    if (d > farD) {
      farD = d;
      far = i;
    }
  }
  const keep = new Uint8Array(n);
  keep[0] = 1;
  keep[far] = 1;
  const tol2 = toleranceM * toleranceM;
  // Pending spans [first, last] over indices 0..n, where n stands for vertex 0 again (the ring closes).
  // Each span pushes at most two smaller ones, so n + 2 pairs always fit.
  const stack = new Int32Array(2 * (n + 2));
  let top = 0;
  // The worst vertex of each half: kept when everything else goes, so a ring stays a polygon.
  const halfWorst: number[] = [];
  for (const [first, last] of [[0, far], [far, n]]) {
    stack[top++] = first;
    stack[top++] = last;
    let isHalf = true;
    while (top > 0) {
      const b = stack[--top];
      const a = stack[--top];
      if (b - a < 2) {
        isHalf = false;
        continue;
      }
      const ax = xs[a], ay = ys[a];
      const bx = xs[b % n], by = ys[b % n];
      let worst = a + 1;
      let worstD = -1;
      for (let i = a + 1; i < b; i++) {
        const d = segmentDistanceSq(xs[i], ys[i], ax, ay, bx, by);
        if (d > worstD) {
          worstD = d;
          worst = i;
        }
      }
      if (isHalf) halfWorst.push(worst);
      isHalf = false;
      if (worstD > tol2) {
        keep[worst] = 1;
        stack[top++] = a;
        stack[top++] = worst;
        stack[top++] = worst;
        stack[top++] = b;
      }
    }
  }
  let kept = 0;
  for (let i = 0; i < n; i++) kept += keep[i];
  if (kept < 3) for (const i of halfWorst) keep[i] = 1;
  let count = 0;
  for (let i = 0; i < n; i++) count += keep[i];
  const out = new Uint32Array(count);
  for (let i = 0, k = 0; i < n; i++) if (keep[i]) out[k++] = i;
  return out;
}

/** Squared distance from (px, py) to the segment a-b. */
function segmentDistanceSq(px: number, py: number, ax: number, ay: number, bx: number, by: number): number {
  const dx = bx - ax;
  const dy = by - ay;
  const len2 = dx * dx + dy * dy;
  let t = len2 > 0 ? ((px - ax) * dx + (py - ay) * dy) / len2 : 0;
  t = t < 0 ? 0 : t > 1 ? 1 : t;
  const ex = ax + t * dx - px;
  const ey = ay + t * dy - py;
  return ex * ex + ey * ey;
}
