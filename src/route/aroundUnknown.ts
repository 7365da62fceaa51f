import type { GeoTransform } from "../dem/grid.js";
import type { XY } from "../layout/types.js";
import { unknownGround } from "./fromMask.js";
import { pointInsideAny, segmentEntersAny, type ObstacleIndex } from "./inside.js";
import { bufferZones } from "./obstacles.js";
import { makeRouter, type Router } from "./shortestPath.js";
import type { BufferedZone } from "./types.js";

/**
 * Transits around unknown ground (DEM nodata), keeping a clearance disc off it.
 *
 * The unknown polygons (nodata pockets, and the frame with the known ground cut
 * out) are buffered by `clearM` as keep-out zones, and the known ground is the
 * router's bounds. Buffering the unknown rather than shrinking the bounds: one
 * operation (bufferZone) shrinks every edge of the known ground, outer rings and
 * pockets alike, and errs outwards only; the bounds then only stop a route from
 * leaving the DEM window round the outside of the buffered frame.
 */
export interface AroundUnknown {
  /**
   * The way from a to b around the buffered unknown ground, [a, ..., b], or null
   * when the straight segment stays clear of it (fly straight) or no way exists
   * (fly straight, warned by the solver). An end inside the buffer (a strip end
   * beside a hole: its own floor is known, but it lies nearer the hole than the
   * buffer) first leaves by the shortest step to the buffer's outline.
   */
  route(a: XY, b: XY): XY[] | null;
  router: Router;
  zones: BufferedZone[];
  /** Unknown ground polygons before buffering (local frame). */
  unknown: XY[][][];
}

/**
 * A router around the unknown ground of a nodata mask (1 = data), or null when
 * the mask has no unknown ground at all.
 * @example
 * const around = aroundUnknownGround(grid.valid, grid.width, grid.height, grid.transform, 18.8);
 * around?.route([0, 0], [200, 0]) // null, or [[0, 0], ..., [200, 0]]
 */
export function aroundUnknownGround(mask: Uint8Array, width: number, height: number, transform: GeoTransform, clearM: number): AroundUnknown | null {
  const g = unknownGround(mask, width, height, transform);
  if (g.unknown.length === 0) return null;
  const zones = bufferZones(g.unknown.map((rings, i) => ({ name: `unknown ground ${i + 1}`, rings, bufferM: clearM })));
  const router = makeRouter(zones, { bounds: g.known });
  const index = router.index;
  return {
    router,
    zones,
    unknown: g.unknown,
    route(a, b) {
      if (!segmentEntersAny(index, a, b) && !pointInsideAny(index, a) && !pointInsideAny(index, b)) return null;
      const a1 = stepOutside(index, a);
      const b1 = stepOutside(index, b);
      if (!a1 || !b1) return null;
      const inner = router.route(a1, b1);
      if (!inner) return null;
      const out: XY[] = [];
      for (const p of [a, ...inner, b]) {
        const q = out[out.length - 1];
        if (!q || Math.hypot(p[0] - q[0], p[1] - q[1]) > 1e-6) out.push([p[0], p[1]]);
      }
      return out.length >= 2 ? out : null;
    },
  };
}

/** Nudge off an outline, metres: a point on it is outside, a rounding error could put it in. */
const NUDGE_M = 1e-3;

/**
 * p itself when it lies outside every zone and inside the bounds, else the
 * nearest point of the obstacles' outlines that does (nudged off the outline,
 * away from p), or null when none does.
 */
function stepOutside(index: ObstacleIndex, p: XY): XY | null {
  if (!pointInsideAny(index, p)) return p;
  const cands: { d: number; q: XY }[] = [];
  for (const ring of index.rings) {
    const m = ring.length;
    for (let i = 0; i < m; i++) {
      const [ax, ay] = ring[i];
      const [bx, by] = ring[(i + 1) % m];
      const ex = bx - ax, ey = by - ay;
      const l2 = ex * ex + ey * ey;
      const t = l2 > 0 ? Math.max(0, Math.min(1, ((p[0] - ax) * ex + (p[1] - ay) * ey) / l2)) : 0;
      const qx = ax + t * ex, qy = ay + t * ey;
      cands.push({ d: Math.hypot(qx - p[0], qy - p[1]), q: [qx, qy] });
    }
  }
  cands.sort((u, v) => u.d - v.d);
  // Where zones overlap the nearest outline can lie inside another zone: take the nearest that does not.
  for (const { d, q } of cands.slice(0, 256)) {
    const out: XY = d > 0 ? [q[0] + ((q[0] - p[0]) / d) * NUDGE_M, q[1] + ((q[1] - p[1]) / d) * NUDGE_M] : q;
    if (!pointInsideAny(index, out)) return out;
  }
  return null;
}
