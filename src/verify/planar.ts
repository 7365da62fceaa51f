/**
 * A straight segment against a polygon in a plane (metres): where the segment
 * is inside it, where it comes within a distance r of its outline, how close it
 * comes and how deep inside it goes. Everything is exact arithmetic on the
 * segment and the polygon's edges (no sampling): the set of points within r of
 * an edge is a capsule (a rectangle and two discs), convex, so a line meets it
 * in one interval; "inside" changes only where the segment meets an edge.
 * Written here, not taken from src/route: the check shares no geometry with the
 * planner it checks.
 */

/** A polygon's rings (outer and holes alike, any winding), open, as flat arrays. */
export interface PlanarPolygon {
  x: Float64Array;
  y: Float64Array;
  /** Ring k holds vertices start[k] .. start[k + 1] - 1; its last vertex joins its first. */
  start: Uint32Array;
  minX: number;
  minY: number;
  maxX: number;
  maxY: number;
}

/**
 * A planar polygon from rings of [x, y] (a closing repeat is dropped).
 * @example planarPolygon([[[0, 0], [10, 0], [10, 10], [0, 10]]]).start // [0, 4]
 */
export function planarPolygon(rings: readonly (readonly number[][])[]): PlanarPolygon {
  const xs: number[] = [];
  const ys: number[] = [];
  const start = [0];
  for (const ring of rings) {
    let n = ring.length;
    if (n > 1 && ring[0][0] === ring[n - 1][0] && ring[0][1] === ring[n - 1][1]) n--;
    for (let i = 0; i < n; i++) {
      xs.push(ring[i][0]);
      ys.push(ring[i][1]);
    }
    start.push(xs.length);
  }
  const x = Float64Array.from(xs);
  const y = Float64Array.from(ys);
  let minX = Infinity, minY = Infinity, maxX = -Infinity, maxY = -Infinity;
  for (let i = 0; i < x.length; i++) {
    if (x[i] < minX) minX = x[i];
    if (x[i] > maxX) maxX = x[i];
    if (y[i] < minY) minY = y[i];
    if (y[i] > maxY) maxY = y[i];
  }
  return { x, y, start: Uint32Array.from(start), minX, minY, maxX, maxY };
}

/** Calls fn(x0, y0, x1, y1) for every edge of the polygon. */
function forEachEdge(p: PlanarPolygon, fn: (x0: number, y0: number, x1: number, y1: number) => void): void {
  for (let k = 0; k + 1 < p.start.length; k++) {
    const a = p.start[k], b = p.start[k + 1];
    for (let i = a; i < b; i++) {
      const j = i + 1 < b ? i + 1 : a;
      fn(p.x[i], p.y[i], p.x[j], p.y[j]);
    }
  }
}

/**
 * Distance from (px, py) to the segment (ax, ay)-(bx, by), and the segment's
 * parameter of the closest point.
 * @example pointSegment(5, 3, 0, 0, 10, 0) // { d: 3, t: 0.5 }
 */
export function pointSegment(px: number, py: number, ax: number, ay: number, bx: number, by: number): { d: number; t: number } {
  const dx = bx - ax, dy = by - ay;
  const l2 = dx * dx + dy * dy;
  let t = l2 > 0 ? ((px - ax) * dx + (py - ay) * dy) / l2 : 0;
  t = t < 0 ? 0 : t > 1 ? 1 : t;
  return { d: Math.hypot(ax + t * dx - px, ay + t * dy - py), t };
}

/**
 * Distance from a point to the polygon's outline (every ring's edges).
 * @example distanceToOutline(planarPolygon([[[0, 0], [10, 0], [10, 10], [0, 10]]]), 5, 4) // 4
 */
export function distanceToOutline(p: PlanarPolygon, px: number, py: number): number {
  let best = Infinity;
  forEachEdge(p, (x0, y0, x1, y1) => {
    const d = pointSegment(px, py, x0, y0, x1, y1).d;
    if (d < best) best = d;
  });
  return best;
}

/**
 * Inside the polygon by the crossing-number rule (even-odd over all rings, so
 * holes are outside; Shimrat, "Algorithm 112: Position of point relative to
 * polygon", CACM 5(8), 1962). Points on the outline may answer either way.
 * @example insidePolygon(planarPolygon([[[0, 0], [10, 0], [10, 10], [0, 10]]]), 5, 5) // true
 */
export function insidePolygon(p: PlanarPolygon, px: number, py: number): boolean {
  let odd = false;
  forEachEdge(p, (x0, y0, x1, y1) => {
    if (y0 > py !== y1 > py && x0 + ((py - y0) / (y1 - y0)) * (x1 - x0) > px) odd = !odd;
  });
  return odd;
}

/**
 * Closest approach of the segment A-B to the polygon's outline: the distance
 * (0 where they meet) and the parameter t on A-B where it is reached. Exact:
 * two segments that do not cross are closest at an end of one of them.
 * @example segmentOutlineDistance(square10, -5, 12, 15, 12) // { d: 2, t: 0.25 } (first of the closest points)
 */
export function segmentOutlineDistance(p: PlanarPolygon, ax: number, ay: number, bx: number, by: number): { d: number; t: number } {
  let best = Infinity;
  let bestT = 0;
  const dx = bx - ax, dy = by - ay;
  const take = (d: number, t: number) => {
    if (d < best || (d === best && t < bestT)) {
      best = d;
      bestT = t;
    }
  };
  forEachEdge(p, (x0, y0, x1, y1) => {
    const ex = x1 - x0, ey = y1 - y0;
    const den = dx * ey - dy * ex;
    if (den !== 0) {
      const t = ((x0 - ax) * ey - (y0 - ay) * ex) / den;
      const u = ((x0 - ax) * dy - (y0 - ay) * dx) / den;
      if (t >= 0 && t <= 1 && u >= 0 && u <= 1) {
        take(0, t);
        return;
      }
    }
    take(pointSegment(ax, ay, x0, y0, x1, y1).d, 0);
    take(pointSegment(bx, by, x0, y0, x1, y1).d, 1);
    const p0 = pointSegment(x0, y0, ax, ay, bx, by);
    take(p0.d, p0.t);
    const p1 = pointSegment(x1, y1, ax, ay, bx, by);
    take(p1.d, p1.t);
  });
  return { d: best, t: bestT };
}

/**
 * The parameters t in [0, 1] where segment A-B lies within distance r (< r)
 * of the segment P-Q: one interval [t0, t1] (written to out), or false when
 * none. The capsule around P-Q is the union of the discs at P and Q and the
 * rectangle between them; it is convex, so the union of the three intervals
 * the line meets is one interval.
 * @example const o = [0, 0]; capsuleInterval(0, 0, 10, 0, 2, -5, 1, 15, 1, o) // true, o ≈ [0.1634, 0.8366] (x from -√3 to 10 + √3)
 */
export function capsuleInterval(px: number, py: number, qx: number, qy: number, r: number, ax: number, ay: number, bx: number, by: number, out: number[]): boolean {
  const dx = bx - ax, dy = by - ay;
  const l2 = dx * dx + dy * dy;
  if (l2 === 0) {
    if (pointSegment(ax, ay, px, py, qx, qy).d < r) {
      out[0] = 0;
      out[1] = 1;
      return true;
    }
    return false;
  }
  let lo = Infinity;
  let hi = -Infinity;
  // Discs: |A + t d - C|^2 < r^2.
  for (const [cx, cy] of [[px, py], [qx, qy]] as const) {
    const fx = ax - cx, fy = ay - cy;
    const b = fx * dx + fy * dy;
    const c = fx * fx + fy * fy - r * r;
    const disc = b * b - l2 * c;
    if (disc <= 0) continue;
    const sq = Math.sqrt(disc);
    // Stable roots of l2 t^2 + 2 b t + c = 0.
    const k = -(b + (b >= 0 ? sq : -sq));
    let t0 = k / l2;
    let t1 = k !== 0 ? c / k : t0;
    if (t1 < t0) [t0, t1] = [t1, t0];
    if (t0 < lo) lo = t0;
    if (t1 > hi) hi = t1;
  }
  // Rectangle: 0 < (X - P).e < |e|^2 and |(X - P) x e| < r |e|, X = A + t d.
  const ex = qx - px, ey = qy - py;
  const le2 = ex * ex + ey * ey;
  if (le2 > 0) {
    const le = Math.sqrt(le2);
    let t0 = -Infinity, t1 = Infinity;
    const clamp = (f0: number, f1: number, min: number, max: number): void => {
      // min < f0 + f1 t < max
      if (f1 === 0) {
        if (!(f0 > min && f0 < max)) t0 = Infinity;
        return;
      }
      let a = (min - f0) / f1, b = (max - f0) / f1;
      if (a > b) [a, b] = [b, a];
      if (a > t0) t0 = a;
      if (b < t1) t1 = b;
    };
    const wx = ax - px, wy = ay - py;
    clamp(wx * ex + wy * ey, dx * ex + dy * ey, 0, le2);
    clamp(wx * ey - wy * ex, dx * ey - dy * ex, -r * le, r * le);
    if (t0 < t1) {
      if (t0 < lo) lo = t0;
      if (t1 > hi) hi = t1;
    }
  }
  if (lo < 0) lo = 0;
  if (hi > 1) hi = 1;
  if (!(lo < hi)) return false;
  out[0] = lo;
  out[1] = hi;
  return true;
}

/**
 * Intervals of t (pairs, sorted, disjoint) where segment A-B is strictly
 * inside the polygon: the segment is cut where it meets an edge, and each piece
 * is tested at its midpoint; a piece whose midpoint lies on the outline (the
 * segment running along an edge) counts as outside.
 * @example insideIntervals(square10, -5, 5, 15, 5) // [0.25, 0.75]
 */
export function insideIntervals(p: PlanarPolygon, ax: number, ay: number, bx: number, by: number): number[] {
  const dx = bx - ax, dy = by - ay;
  if (Math.max(ax, bx) < p.minX || Math.min(ax, bx) > p.maxX || Math.max(ay, by) < p.minY || Math.min(ay, by) > p.maxY) return [];
  const cuts = [0, 1];
  const l2 = dx * dx + dy * dy;
  forEachEdge(p, (x0, y0, x1, y1) => {
    if (Math.max(x0, x1) < Math.min(ax, bx) || Math.min(x0, x1) > Math.max(ax, bx) || Math.max(y0, y1) < Math.min(ay, by) || Math.min(y0, y1) > Math.max(ay, by)) return;
    const ex = x1 - x0, ey = y1 - y0;
    const den = dx * ey - dy * ex;
    if (den !== 0) {
      const t = ((x0 - ax) * ey - (y0 - ay) * ex) / den;
      const u = ((x0 - ax) * dy - (y0 - ay) * dx) / den;
      if (t > 0 && t < 1 && u >= 0 && u <= 1) cuts.push(t);
    } else if (l2 > 0) {
      // Parallel: where the edge's ends fall along the segment (collinear overlaps begin and end there).
      for (const [vx, vy] of [[x0, y0], [x1, y1]] as const) {
        const t = ((vx - ax) * dx + (vy - ay) * dy) / l2;
        if (t > 0 && t < 1) cuts.push(t);
      }
    }
  });
  cuts.sort((a, b) => a - b);
  const out: number[] = [];
  for (let k = 0; k + 1 < cuts.length; k++) {
    const t0 = cuts[k], t1 = cuts[k + 1];
    if (!(t1 > t0)) continue;
    const tm = 0.5 * (t0 + t1);
    const mx = ax + tm * dx, my = ay + tm * dy;
    if (!insidePolygon(p, mx, my) || distanceToOutline(p, mx, my) === 0) continue;
    if (out.length && out[out.length - 1] === t0) out[out.length - 1] = t1;
    else out.push(t0, t1);
  }
  return out;
}

/**
 * Intervals of t where segment A-B comes within r (< r) of the outline: the
 * union of the capsule intervals of every edge, merged, as sorted pairs.
 * @example nearOutlineIntervals(square10, 2, -5, 12, 15, 12) // []: 2 m away, not closer
 */
export function nearOutlineIntervals(p: PlanarPolygon, r: number, ax: number, ay: number, bx: number, by: number): number[] {
  if (!(r > 0)) return [];
  if (Math.max(ax, bx) < p.minX - r || Math.min(ax, bx) > p.maxX + r || Math.max(ay, by) < p.minY - r || Math.min(ay, by) > p.maxY + r) return [];
  const found: number[] = [];
  const o = [0, 0];
  forEachEdge(p, (x0, y0, x1, y1) => {
    if (Math.max(x0, x1) + r < Math.min(ax, bx) || Math.min(x0, x1) - r > Math.max(ax, bx) || Math.max(y0, y1) + r < Math.min(ay, by) || Math.min(y0, y1) - r > Math.max(ay, by)) return;
    if (capsuleInterval(x0, y0, x1, y1, r, ax, ay, bx, by, o)) found.push(o[0], o[1]);
  });
  return mergeIntervals(found);
}

/**
 * Sorted, merged pairs from any list of [t0, t1] pairs.
 * @example mergeIntervals([0.5, 0.7, 0.1, 0.6]) // [0.1, 0.7]
 */
export function mergeIntervals(pairs: readonly number[]): number[] {
  const idx: number[] = [];
  for (let i = 0; i < pairs.length; i += 2) if (pairs[i + 1] > pairs[i]) idx.push(i);
  idx.sort((a, b) => pairs[a] - pairs[b]);
  const out: number[] = [];
  for (const i of idx) {
    const a = pairs[i], b = pairs[i + 1];
    if (out.length && a <= out[out.length - 1]) {
      if (b > out[out.length - 1]) out[out.length - 1] = b;
    } else out.push(a, b);
  }
  return out;
}

/**
 * Pairs of `a` with the pairs of `b` taken out (both sorted and disjoint).
 * @example subtractIntervals([0, 1], [0.2, 0.3]) // [0, 0.2, 0.3, 1]
 */
export function subtractIntervals(a: readonly number[], b: readonly number[]): number[] {
  const out: number[] = [];
  for (let i = 0; i < a.length; i += 2) {
    let s = a[i];
    const e = a[i + 1];
    for (let j = 0; j < b.length && s < e; j += 2) {
      if (b[j + 1] <= s || b[j] >= e) continue;
      if (b[j] > s) out.push(s, b[j]);
      s = Math.max(s, b[j + 1]);
    }
    if (s < e) out.push(s, e);
  }
  return out;
}

/**
 * Total length of sorted, disjoint pairs (in units of t).
 * @example intervalsLength([0, 0.25, 0.5, 0.75]) // 0.5
 */
export function intervalsLength(pairs: readonly number[]): number {
  let s = 0;
  for (let i = 0; i < pairs.length; i += 2) s += pairs[i + 1] - pairs[i];
  return s;
}

/**
 * Largest distance to the outline over the parameters [t0, t1] of segment A-B
 * (a piece inside the polygon), to within `epsM`, and where it is reached.
 * Branch and bound: the distance to a set changes by at most the distance
 * moved (it is 1-Lipschitz), so over a piece of length h with end values fa,
 * fb it is at most (fa + fb + h) / 2; pieces whose bound cannot beat the best
 * value found (or `floorM`, a value already found elsewhere) by more than epsM
 * are dropped, the rest halved.
 * @example deepestInside(square10, -5, 5, 15, 5, 0.25, 0.75, 0.01) // { d: 5, t: 0.5 }
 */
export function deepestInside(p: PlanarPolygon, ax: number, ay: number, bx: number, by: number, t0: number, t1: number, epsM: number, floorM = -Infinity): { d: number; t: number } {
  const len = Math.hypot(bx - ax, by - ay);
  const f = (t: number) => distanceToOutline(p, ax + t * (bx - ax), ay + t * (by - ay));
  const f0 = f(t0);
  const f1 = f(t1);
  let best = f0 >= f1 ? f0 : f1;
  let bestT = f0 >= f1 ? t0 : t1;
  const stack: number[] = [t0, t1, f0, f1];
  // A cap on evaluations keeps pathological outlines bounded; the bound then holds to the last piece's size.
  for (let evals = 0; stack.length && evals < 5_000; evals++) {
    const fb = stack.pop()!, fa = stack.pop()!, b = stack.pop()!, a = stack.pop()!;
    if ((fa + fb + (b - a) * len) / 2 <= Math.max(best, floorM) + epsM) continue;
    const m = 0.5 * (a + b);
    const fm = f(m);
    if (fm > best) {
      best = fm;
      bestT = m;
    }
    stack.push(a, m, fa, fm, m, b, fm, fb);
  }
  return { d: best, t: bestT };
}
