/**
 * Gates for the fewest-waypoint search: the detail band where the aircraft
 * can hold it, the nearest reachable heights where it cannot.
 *
 * 1. Hard envelope E: heights inside the hard corridor that lie on some
 *    gradient-limited path through the whole leg (forward then backward
 *    interval propagation; with vertices at stations the reachable set from
 *    an interval is the interval widened by [gMin, gMax] * step).
 * 2. Target per station B: the band clipped to the hard corridor; where they
 *    do not meet, the slice of the hard corridor as wide as the band next to
 *    it (detail is lost there anyway, and pinning the path to the ceiling line
 *    would cost a waypoint per station over rough ground).
 * 3. Forward pass: R_j = (C_{j-1} widened by the gradient limits) ∩ E_j;
 *    C_j = R_j ∩ B_j, or when empty the single height of R_j nearest to B_j
 *    (the aircraft climbs or descends at its limit towards the band). Every
 *    height of C_j has a predecessor in C_{j-1}, so a path through all gates
 *    exists, and the stations whose gate missed B are exactly those where the
 *    gradient limits (not the pointwise bounds) kept the path off the band.
 * The forward pass is a stated choice, not a global optimum of band distance:
 * it holds the band as long as it can and then chases it at the limit gradient.
 */
export interface TargetGates {
  lo: Float64Array;
  hi: Float64Array;
  /** 1 where the gate had to leave the station's target (gradient limited). */
  offTarget: Uint8Array;
}

/** Hard envelope; returns the first station where it is empty, or -1 (envelope written to eLo/eHi). */
export function hardEnvelope(
  s: Float64Array, lo: Float64Array, hi: Float64Array, gMin: number, gMax: number, eLo: Float64Array, eHi: Float64Array,
): number {
  const n = s.length;
  eLo[0] = lo[0];
  eHi[0] = hi[0];
  if (!(eLo[0] <= eHi[0])) return 0;
  for (let j = 1; j < n; j++) {
    const d = s[j] - s[j - 1];
    eLo[j] = Math.max(lo[j], eLo[j - 1] + gMin * d);
    eHi[j] = Math.min(hi[j], eHi[j - 1] + gMax * d);
    if (!(eLo[j] <= eHi[j] + 1e-9)) return j;
  }
  for (let j = n - 2; j >= 0; j--) {
    const d = s[j + 1] - s[j];
    eLo[j] = Math.max(eLo[j], eLo[j + 1] - gMax * d);
    eHi[j] = Math.min(eHi[j], eHi[j + 1] - gMin * d);
    if (!(eLo[j] <= eHi[j] + 1e-9)) return j;
  }
  return -1;
}

/**
 * Gates through the band where reachable (see the module comment). `tLo/tHi`
 * is the per-station target (already clipped to the hard corridor), `eLo/eHi`
 * the hard envelope from hardEnvelope.
 * @example targetGates(s, eLo, eHi, tLo, tHi, -0.3, 0.3)
 */
export function targetGates(
  s: Float64Array, eLo: Float64Array, eHi: Float64Array, tLo: Float64Array, tHi: Float64Array, gMin: number, gMax: number,
): TargetGates {
  const n = s.length;
  const lo = new Float64Array(n);
  const hi = new Float64Array(n);
  const offTarget = new Uint8Array(n);
  let rLo = eLo[0], rHi = eHi[0];
  for (let j = 0; j < n; j++) {
    if (j > 0) {
      const d = s[j] - s[j - 1];
      rLo = Math.max(eLo[j], lo[j - 1] + gMin * d);
      rHi = Math.min(eHi[j], hi[j - 1] + gMax * d);
      if (rLo > rHi) { const c = (rLo + rHi) / 2; rLo = rHi = c; } // float slack only
    }
    const a = Math.max(rLo, tLo[j]);
    const b = Math.min(rHi, tHi[j]);
    if (a <= b) {
      lo[j] = a;
      hi[j] = b;
    } else {
      const z = tLo[j] > rHi ? rHi : rLo;
      lo[j] = hi[j] = z;
      offTarget[j] = 1;
    }
  }
  return { lo, hi, offTarget };
}
