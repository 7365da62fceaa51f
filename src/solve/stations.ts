import type { LayoutLeg, Stations, XY } from "../layout/types.js";

/**
 * Stations along one leg at `stepM` spacing, both ends included (at least
 * two stations); along `from, ...via, to` when the leg has vertices (see
 * stationsAlongPolyline). Private to the solver until the layout stage's own
 * sampler lands; the integrator may swap it for that one (same `Stations` contract).
 * @example stationsAlongLeg({ kind: "strip", strip: 1, from: [0, 0], to: [10, 0], lengthM: 10 }, 1, 30).s.length // 11
 */
export function stationsAlongLeg(leg: LayoutLeg, stepM: number, zoneHalfAcrossM: number, zoneHalfAlongM = stepM / 2): Stations {
  if (leg.via?.length) return stationsAlongPolyline([leg.from, ...leg.via, leg.to], stepM, zoneHalfAcrossM, zoneHalfAlongM).stations;
  const dx = leg.to[0] - leg.from[0];
  const dy = leg.to[1] - leg.from[1];
  const len = Math.hypot(dx, dy);
  const ux = len > 0 ? dx / len : 1;
  const uy = len > 0 ? dy / len : 0;
  const full = Math.floor(len / stepM + 1e-9);
  const tail = len - full * stepM > 1e-6 * stepM ? 1 : 0;
  const n = Math.max(2, full + 1 + tail);
  const s = new Float64Array(n);
  const x = new Float64Array(n);
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const si = i === n - 1 ? len : Math.min(i * stepM, len);
    s[i] = si;
    x[i] = leg.from[0] + ux * si;
    y[i] = leg.from[1] + uy * si;
  }
  return { s, x, y, ux, uy, stepM, zoneHalfAcrossM, zoneHalfAlongM };
}

/**
 * Stations along a polyline, at most `stepM` apart, every vertex a station
 * (`corners`: their indices, first and last included), s the distance along
 * the whole polyline. Two neighbouring stations then lie on one straight
 * piece, so every point of the path lies within one station step of a station
 * on the same straight line, which the corridor's reach argument needs.
 * `ux`, `uy` are the first piece's direction (the detail band's zones, which
 * transits do not use, are the only users of it).
 * @example stationsAlongPolyline([[0, 0], [10, 0], [10, 5]], 4, 30).corners // Int32Array [0, 3, 5]
 */
export function stationsAlongPolyline(
  points: readonly XY[], stepM: number, zoneHalfAcrossM: number, zoneHalfAlongM = stepM / 2,
): { stations: Stations; corners: Int32Array } {
  const s: number[] = [0], x: number[] = [points[0][0]], y: number[] = [points[0][1]];
  const corners: number[] = [0];
  let s0 = 0;
  for (let v = 1; v < points.length; v++) {
    const [ax, ay] = points[v - 1];
    const [bx, by] = points[v];
    const len = Math.hypot(bx - ax, by - ay);
    if (!(len > 0)) continue;
    // Equal steps of at most stepM within the piece: no sliver of a last step.
    const k = Math.max(1, Math.ceil(len / stepM - 1e-9));
    for (let i = 1; i <= k; i++) {
      const t = i / k;
      s.push(s0 + (i === k ? len : t * len));
      x.push(i === k ? bx : ax + t * (bx - ax));
      y.push(i === k ? by : ay + t * (by - ay));
    }
    s0 += len;
    corners.push(s.length - 1);
  }
  if (s.length === 1) {
    // A polyline of zero length: two stations at the one point (as a straight leg of zero length has).
    s.push(0); x.push(x[0]); y.push(y[0]); corners.push(1);
  }
  const [p0, p1] = [points[0], points.find((p) => p[0] !== points[0][0] || p[1] !== points[0][1]) ?? [points[0][0] + 1, points[0][1]]];
  const d = Math.hypot(p1[0] - p0[0], p1[1] - p0[1]);
  return {
    stations: { s: Float64Array.from(s), x: Float64Array.from(x), y: Float64Array.from(y), ux: (p1[0] - p0[0]) / d, uy: (p1[1] - p0[1]) / d, stepM, zoneHalfAcrossM, zoneHalfAlongM },
    corners: Int32Array.from(corners),
  };
}
