import type { XY } from "../layout/types.js";
import { pointInsideAny, segmentEntersAny, type ObstacleIndex } from "./inside.js";
import { makeRouter, type Router } from "./shortestPath.js";
import type { BufferedZone } from "./types.js";

/**
 * Transits around obstacles: buffered keep-out zones, buffered unknown ground,
 * and (with `bounds`) everything outside the ground the flight may use.
 */
export interface Detour {
  /**
   * The way from a to b around the obstacles, [a, ..., b], or null when the
   * straight segment stays clear of them (fly straight) or no way exists (see
   * `reachable`). An end inside an obstacle (a strip end on a zone's buffer
   * outline, or beside a hole: its own floor is known, but it lies nearer the
   * hole than the buffer) first leaves by the shortest step to the outline.
   */
  route(a: XY, b: XY): XY[] | null;
  /** True when b can be reached from a: straight, or along some way around. */
  reachable(a: XY, b: XY): boolean;
  /** p, or the nearest point outside every obstacle when p lies inside one; null when none is found. */
  outside(p: XY): XY | null;
  router: Router;
  zones: BufferedZone[];
}

/**
 * A detour planner over buffered zones, kept inside `bounds` when given; build
 * it once per obstacle set and route many transits.
 * @example
 * const d = makeDetour(bufferZones([{ name: "yard", rings: [[[0, -10], [10, -10], [10, 10], [0, 10]]], bufferM: 5 }]));
 * d.route([-20, 0], [30, 0]) // [[-20, 0], ..., [30, 0]] around the yard's buffer
 */
export function makeDetour(zones: BufferedZone[], bounds?: XY[][][]): Detour {
  const router = makeRouter(zones, bounds ? { bounds } : {});
  const index = router.index;
  const clear = (a: XY, b: XY) => !segmentEntersAny(index, a, b) && !pointInsideAny(index, a) && !pointInsideAny(index, b);
  const route = (a: XY, b: XY): XY[] | null => {
    if (clear(a, b)) return null;
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
  };
  return {
    router,
    zones,
    route,
    reachable: (a, b) => clear(a, b) || route(a, b) !== null,
    outside: (p) => stepOutside(index, p),
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
