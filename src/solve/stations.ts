import type { LayoutLeg, Stations } from "../layout/types.js";

/**
 * Stations along one leg at `stepM` spacing, both ends included (at least
 * two stations). Private to the solver until the layout stage's own sampler
 * lands; the integrator may swap it for that one (same `Stations` contract).
 * @example stationsAlongLeg({ kind: "strip", strip: 1, from: [0, 0], to: [10, 0], lengthM: 10 }, 1, 30).s.length // 11
 */
export function stationsAlongLeg(leg: LayoutLeg, stepM: number, zoneHalfAcrossM: number, zoneHalfAlongM = stepM / 2): Stations {
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
