import type { XY } from "../layout/types.js";

/**
 * Ring housekeeping for the route stage. Every ring here is stored with the
 * ground it bounds on its left: outer rings counter-clockwise, holes clockwise,
 * no closing repeat. Then one winding count over all rings tells how many
 * regions hold a point (see edgeGrid.ts).
 */

/**
 * The ring without its closing repeat and without repeated consecutive vertices.
 * @example openRing([[0, 0], [1, 0], [1, 0], [0, 1], [0, 0]]) // [[0, 0], [1, 0], [0, 1]]
 */
export function openRing(ring: readonly XY[]): XY[] {
  const out: XY[] = [];
  for (const p of ring) {
    const last = out[out.length - 1];
    if (!last || last[0] !== p[0] || last[1] !== p[1]) out.push([p[0], p[1]]);
  }
  while (out.length > 1 && out[0][0] === out[out.length - 1][0] && out[0][1] === out[out.length - 1][1]) out.pop();
  return out;
}

/**
 * Signed area (shoelace), positive for a counter-clockwise ring, m².
 * @example signedArea([[0, 0], [2, 0], [2, 1], [0, 1]]) // 2
 */
export function signedArea(ring: readonly XY[]): number {
  let a = 0;
  const n = ring.length;
  if (n < 3) return 0;
  const [ox, oy] = ring[0];
  for (let i = 1; i + 1 < n; i++) {
    a += (ring[i][0] - ox) * (ring[i + 1][1] - oy) - (ring[i + 1][0] - ox) * (ring[i][1] - oy);
  }
  return a / 2;
}

/**
 * The ring (opened) wound counter-clockwise when `ccw`, else clockwise.
 * @example windRing([[0, 0], [0, 1], [1, 0]], true) // [[1, 0], [0, 1], [0, 0]]
 */
export function windRing(ring: readonly XY[], ccw: boolean): XY[] {
  const r = openRing(ring);
  return signedArea(r) > 0 === ccw ? r : r.reverse();
}

/**
 * Polygon rings (outer first) wound with the polygon on the left; rings with
 * fewer than three distinct vertices or no area are dropped (a dropped outer
 * drops the polygon).
 * @example polygonLeft([[[0, 0], [0, 1], [1, 1], [1, 0]]]) // [[[1, 0], [1, 1], [0, 1], [0, 0]]]
 */
export function polygonLeft(rings: readonly (readonly XY[])[]): XY[][] {
  const out: XY[][] = [];
  for (let i = 0; i < rings.length; i++) {
    const r = windRing(rings[i], i === 0);
    if (r.length >= 3 && signedArea(r) !== 0) out.push(r);
    else if (i === 0) return [];
  }
  return out;
}

/**
 * Even-odd test of a point against one ring (boundary points may go either way).
 * @example pointInRing([0.5, 0.5], [[0, 0], [1, 0], [1, 1], [0, 1]]) // true
 */
export function pointInRing(p: XY, ring: readonly XY[]): boolean {
  const [x, y] = p;
  let inside = false;
  for (let i = 0, j = ring.length - 1; i < ring.length; j = i++) {
    const [xi, yi] = ring[i];
    const [xj, yj] = ring[j];
    if (yi > y !== yj > y && x < ((xj - xi) * (y - yi)) / (yj - yi) + xi) inside = !inside;
  }
  return inside;
}

/**
 * Counter-clockwise outer rings and clockwise holes, grouped into polygons: each
 * hole goes to the smallest outer ring that holds the midpoint of its first side
 * (rings of one outline meet at most at vertices, so that midpoint is off every
 * other ring). Holes inside no outer ring are dropped: they bound nothing.
 * @example groupRings([[[0, 0], [4, 0], [4, 4], [0, 4]], [[1, 1], [1, 2], [2, 2], [2, 1]]]).length // 1
 */
export function groupRings(rings: readonly XY[][]): XY[][][] {
  const outers = rings.filter((r) => signedArea(r) > 0).map((r) => ({ ring: r, area: signedArea(r), holes: [] as XY[][] }));
  outers.sort((a, b) => a.area - b.area);
  for (const hole of rings) {
    if (signedArea(hole) >= 0) continue;
    const probe: XY = [(hole[0][0] + hole[1][0]) / 2, (hole[0][1] + hole[1][1]) / 2];
    const home = outers.find((o) => pointInRing(probe, o.ring));
    if (home) home.holes.push(hole);
  }
  return outers.map((o) => [o.ring, ...o.holes]);
}
