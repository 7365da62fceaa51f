/**
 * Is a polygon's set of rings valid for a strip layout? Finds where rings
 * touch or cross themselves or each other, and holes that are not inside the
 * outer ring or lie inside another hole — the ring rules of OGC Simple
 * Features (OGC 06-103r4, 6.1.11.1), stricter in that no two rings may touch.
 *
 * Written here rather than with turf's `kinks`, which tests every pair of
 * edges: a 200 000-vertex parcel is 2 * 10^10 pairs. Edges are put in a sparse
 * uniform grid (buckets keyed by cell) and only edges sharing a cell are
 * tested, so a typical outline costs a few tests per edge. Point-in-ring
 * tests use horizontal slabs of the same edges.
 */

/** Where and between which rings the first problem was found. */
export type RingProblem =
  | { kind: "self"; ring: number; x: number; y: number }
  | { kind: "cross"; ringA: number; ringB: number; x: number; y: number }
  | { kind: "hole-outside"; ring: number; x: number; y: number }
  | { kind: "hole-in-hole"; ring: number; inside: number; x: number; y: number };

/** Edges of all rings as flat arrays; edge k runs from vertex k to the next vertex of its ring. */
interface Edges {
  x0: Float64Array;
  y0: Float64Array;
  x1: Float64Array;
  y1: Float64Array;
  ring: Uint32Array;
  /** Index of the edge within its ring and the ring's edge count (adjacency test). */
  index: Uint32Array;
  count: Uint32Array;
}

/**
 * The first problem with a polygon's rings (ring 0 outer, the rest holes),
 * or null when the rings are valid. Rings are open (no closing repeat), free
 * of consecutive duplicates, in any planar coordinates (lon/lat or metres).
 * Self-intersections are reported before crossings between rings, and those
 * before misplaced holes; among equals, the lowest ring and edge numbers win.
 * @example
 * ringProblem([[[0, 0], [10, 10], [10, 0], [0, 10]]]) // { kind: "self", ring: 0, x: 5, y: 5 }
 */
export function ringProblem(rings: readonly (readonly number[][])[]): RingProblem | null {
  const edges = ringEdges(rings);
  const hit = firstIntersection(edges);
  if (hit) {
    const [a, b, x, y] = hit;
    const ra = edges.ring[a], rb = edges.ring[b];
    return ra === rb ? { kind: "self", ring: ra, x, y } : { kind: "cross", ringA: Math.min(ra, rb), ringB: Math.max(ra, rb), x, y };
  }
  if (rings.length < 2) return null;
  // No two rings meet, so one vertex tells on which side of every other ring a hole lies.
  const slabs = slabIndex(edges);
  for (let j = 1; j < rings.length; j++) {
    const [px, py] = rings[j][0];
    const inside = ringsAround(edges, slabs, px, py, j);
    if (!inside.includes(0)) return { kind: "hole-outside", ring: j, x: px, y: py };
    const outerHole = inside.find((r) => r !== 0);
    if (outerHole !== undefined) return { kind: "hole-in-hole", ring: j, inside: outerHole, x: px, y: py };
  }
  return null;
}

function ringEdges(rings: readonly (readonly number[][])[]): Edges {
  let m = 0;
  for (const r of rings) m += r.length;
  const e: Edges = {
    x0: new Float64Array(m), y0: new Float64Array(m), x1: new Float64Array(m), y1: new Float64Array(m),
    ring: new Uint32Array(m), index: new Uint32Array(m), count: new Uint32Array(m),
  };
  let k = 0;
  rings.forEach((r, ri) => {
    const n = r.length;
    for (let i = 0; i < n; i++, k++) {
      const p = r[i], q = r[(i + 1) % n];
      e.x0[k] = p[0], e.y0[k] = p[1], e.x1[k] = q[0], e.y1[k] = q[1];
      e.ring[k] = ri, e.index[k] = i, e.count[k] = n;
    }
  });
  return e;
}

/**
 * The first (by kind, then ring, then edge) pair of edges that meet other
 * than at the vertex two consecutive edges share, with the meeting point.
 */
function firstIntersection(e: Edges): [number, number, number, number] | null {
  const m = e.x0.length;
  if (m === 0) return null;
  let minX = Infinity, minY = Infinity;
  const len = new Float64Array(m);
  let total = 0;
  for (let k = 0; k < m; k++) {
    minX = Math.min(minX, e.x0[k]);
    minY = Math.min(minY, e.y0[k]);
    len[k] = Math.hypot(e.x1[k] - e.x0[k], e.y1[k] - e.y0[k]);
    total += len[k];
  }
  // Cell about twice the typical (median) edge, but never so small that long
  // edges fill more than a few cells each on average (total length / 2m).
  const sorted = len.slice().sort();
  const cell = Math.max(2 * sorted[m >> 1], total / (2 * m), Number.MIN_VALUE);
  const rowKey = 2 ** 26;
  let keys = new Float64Array(Math.max(16, 4 * m));
  let owner = new Uint32Array(keys.length);
  let used = 0;
  const mine: number[] = [];
  for (let k = 0; k < m; k++) {
    // Walk the edge in pieces no longer than a cell; each piece's box spans at most 2 x 2 cells.
    const pieces = Math.max(1, Math.ceil(len[k] / cell));
    mine.length = 0;
    for (let p = 0; p < pieces; p++) {
      const t0 = p / pieces, t1 = (p + 1) / pieces;
      const ax = e.x0[k] + t0 * (e.x1[k] - e.x0[k]), bx = e.x0[k] + t1 * (e.x1[k] - e.x0[k]);
      const ay = e.y0[k] + t0 * (e.y1[k] - e.y0[k]), by = e.y0[k] + t1 * (e.y1[k] - e.y0[k]);
      const c0 = Math.floor((Math.min(ax, bx) - minX) / cell), c1 = Math.floor((Math.max(ax, bx) - minX) / cell);
      const r0 = Math.floor((Math.min(ay, by) - minY) / cell), r1 = Math.floor((Math.max(ay, by) - minY) / cell);
      for (let c = c0; c <= c1; c++) {
        for (let r = r0; r <= r1; r++) {
          const key = c * rowKey + r;
          // A piece shares cells with the pieces just before it only.
          if (mine.lastIndexOf(key, mine.length - 1) >= Math.max(0, mine.length - 8)) continue;
          mine.push(key);
          if (used === keys.length) {
            const k2 = new Float64Array(2 * used);
            k2.set(keys);
            keys = k2;
            const o2 = new Uint32Array(2 * used);
            o2.set(owner);
            owner = o2;
          }
          keys[used] = key;
          owner[used++] = k;
        }
      }
    }
  }
  const order = new Uint32Array(used);
  for (let i = 0; i < used; i++) order[i] = i;
  const ks = keys;
  order.sort((a, b) => ks[a] - ks[b] || a - b);

  let best: [number, number, number, number] | null = null;
  for (let g = 0; g < used; ) {
    let h = g + 1;
    while (h < used && keys[order[h]] === keys[order[g]]) h++;
    for (let i = g; i < h; i++) {
      for (let j = i + 1; j < h; j++) {
        let a = owner[order[i]], b = owner[order[j]];
        if (a > b) [a, b] = [b, a];
        if (best && !before(e, a, b, best[0], best[1])) continue;
        const at = meet(e, a, b);
        if (at) best = [a, b, at[0], at[1]];
      }
    }
    g = h;
  }
  return best;
}

/**
 * Edge pair (a, b) is reported before (c, d) (a < b, c < d): self-intersections
 * first, then by edge numbers, which grow with the ring number.
 */
function before(e: Edges, a: number, b: number, c: number, d: number): boolean {
  const selfAB = e.ring[a] === e.ring[b], selfCD = e.ring[c] === e.ring[d];
  if (selfAB !== selfCD) return selfAB;
  return a < c || (a === c && b < d);
}

/**
 * Where edges a and b meet, or null. Consecutive edges of one ring share a
 * vertex by construction; they only meet beyond it when they fold back along
 * one line (a spike).
 */
function meet(e: Edges, a: number, b: number): [number, number] | null {
  // Work relative to a's start: lon/lat values share most of their digits.
  const ox = e.x0[a], oy = e.y0[a];
  const px = 0, py = 0, qx = e.x1[a] - ox, qy = e.y1[a] - oy;
  const rx = e.x0[b] - ox, ry = e.y0[b] - oy, sx = e.x1[b] - ox, sy = e.y1[b] - oy;
  if (e.ring[a] === e.ring[b]) {
    const n = e.count[a];
    const ia = e.index[a], ib = e.index[b];
    if ((ia + 1) % n === ib) return foldsBack(px, py, qx, qy, sx, sy) ? [e.x1[a], e.y1[a]] : null;
    if ((ib + 1) % n === ia) return foldsBack(qx, qy, px, py, rx, ry) ? [e.x0[a], e.y0[a]] : null;
  }
  const d1 = orient(rx, ry, sx, sy, px, py), d2 = orient(rx, ry, sx, sy, qx, qy);
  const d3 = orient(px, py, qx, qy, rx, ry), d4 = orient(px, py, qx, qy, sx, sy);
  if (((d1 > 0 && d2 < 0) || (d1 < 0 && d2 > 0)) && ((d3 > 0 && d4 < 0) || (d3 < 0 && d4 > 0))) {
    const t = d1 / (d1 - d2);
    return [ox + px + t * (qx - px), oy + py + t * (qy - py)];
  }
  // Touching: an end of one edge on the other (this also catches collinear overlaps).
  if (d1 === 0 && onSegment(rx, ry, sx, sy, px, py)) return [ox + px, oy + py];
  if (d2 === 0 && onSegment(rx, ry, sx, sy, qx, qy)) return [ox + qx, oy + qy];
  if (d3 === 0 && onSegment(px, py, qx, qy, rx, ry)) return [ox + rx, oy + ry];
  if (d4 === 0 && onSegment(px, py, qx, qy, sx, sy)) return [ox + sx, oy + sy];
  return null;
}

/** Edges p->v and v->w fold back on each other: w lies on the line through p and v, on p's side. */
function foldsBack(px: number, py: number, vx: number, vy: number, wx: number, wy: number): boolean {
  return orient(px, py, vx, vy, wx, wy) === 0 && (px - vx) * (wx - vx) + (py - vy) * (wy - vy) > 0;
}

/** Twice the signed area of triangle a, b, c: > 0 when c lies left of a->b. */
function orient(ax: number, ay: number, bx: number, by: number, cx: number, cy: number): number {
  return (bx - ax) * (cy - ay) - (by - ay) * (cx - ax);
}

/** c, known to be on the line a-b, lies within the segment's box. */
function onSegment(ax: number, ay: number, bx: number, by: number, cx: number, cy: number): boolean {
  return Math.min(ax, bx) <= cx && cx <= Math.max(ax, bx) && Math.min(ay, by) <= cy && cy <= Math.max(ay, by);
}

interface Slabs {
  minY: number;
  height: number;
  start: Uint32Array;
  items: Uint32Array;
}

/** Edges bucketed by horizontal slabs of equal height (CSR layout: start offsets, then edge numbers). */
function slabIndex(e: Edges): Slabs {
  const m = e.x0.length;
  let minY = Infinity, maxY = -Infinity, spanSum = 0;
  for (let k = 0; k < m; k++) {
    minY = Math.min(minY, e.y0[k], e.y1[k]);
    maxY = Math.max(maxY, e.y0[k], e.y1[k]);
    spanSum += Math.abs(e.y1[k] - e.y0[k]);
  }
  const h = maxY - minY;
  // About one slab per edge, fewer when tall edges would each fill many slabs (keeps entries near 8 m).
  const count = Math.max(1, Math.min(m, spanSum > 0 ? Math.floor((7 * m * h) / spanSum) : m));
  const height = h > 0 ? h / count : 1;
  const slab = (y: number) => Math.min(count - 1, Math.max(0, Math.floor((y - minY) / height)));
  const start = new Uint32Array(count + 1);
  for (let k = 0; k < m; k++) for (let s = slab(Math.min(e.y0[k], e.y1[k])); s <= slab(Math.max(e.y0[k], e.y1[k])); s++) start[s + 1]++;
  for (let s = 0; s < count; s++) start[s + 1] += start[s];
  const fill = start.slice(0, count);
  const items = new Uint32Array(start[count]);
  for (let k = 0; k < m; k++) for (let s = slab(Math.min(e.y0[k], e.y1[k])); s <= slab(Math.max(e.y0[k], e.y1[k])); s++) items[fill[s]++] = k;
  return { minY, height, start, items };
}

/**
 * Rings other than `self` that enclose (px, py), by the crossing-number rule
 * (a ray towards +x; Shimrat, "Algorithm 112: Position of point relative to
 * polygon", CACM 5(8), 1962), counted per ring.
 */
function ringsAround(e: Edges, slabs: Slabs, px: number, py: number, self: number): number[] {
  const s = Math.min(slabs.start.length - 2, Math.max(0, Math.floor((py - slabs.minY) / slabs.height)));
  const odd = new Map<number, boolean>();
  for (let i = slabs.start[s]; i < slabs.start[s + 1]; i++) {
    const k = slabs.items[i];
    const r = e.ring[k];
    if (r === self) continue;
    const y0 = e.y0[k], y1 = e.y1[k];
    if (y0 > py === y1 > py) continue;
    const x = e.x0[k] + ((py - y0) / (y1 - y0)) * (e.x1[k] - e.x0[k]);
    if (x > px) odd.set(r, !odd.get(r));
  }
  return [...odd.entries()].filter(([, v]) => v).map(([r]) => r).sort((a, b) => a - b);
}
