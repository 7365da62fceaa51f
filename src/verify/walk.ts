/**
 * A leg cut where it crosses the grid lines between cell centres: on each piece
 * the leg lies in one quad, where the ground along it is a quadratic in the
 * leg's parameter t (bilinear along a straight line), so checks against the
 * ground straight below are exact per piece.
 */

let breaks = new Float64Array(4096);

/**
 * Sorted parameters t in [0, 1] where the leg (ca, ra) -> (cb, rb) (index space)
 * crosses an integer column or row, with 0 and 1; returns the array and count.
 * The array is shared scratch: use it before the next call.
 * @example const { t, n } = legBreaks(0.5, 0.5, 3.5, 0.5) // t = 0, 1/6, 1/2, 5/6, 1
 */
export function legBreaks(ca: number, ra: number, cb: number, rb: number): { t: Float64Array; n: number } {
  const dc = cb - ca;
  const dr = rb - ra;
  const need = Math.abs(Math.floor(cb) - Math.floor(ca)) + Math.abs(Math.floor(rb) - Math.floor(ra)) + 4;
  if (need > breaks.length) breaks = new Float64Array(Math.max(need, breaks.length * 2));
  // Two increasing sequences (columns and rows), merged.
  const kc0 = dc > 0 ? Math.floor(ca) + 1 : Math.ceil(ca) - 1;
  const kr0 = dr > 0 ? Math.floor(ra) + 1 : Math.ceil(ra) - 1;
  const stepC = dc > 0 ? 1 : -1;
  const stepR = dr > 0 ? 1 : -1;
  let kc = kc0;
  let kr = kr0;
  const tc = () => (dc === 0 ? Infinity : (kc - ca) / dc);
  const tr = () => (dr === 0 ? Infinity : (kr - ra) / dr);
  let n = 0;
  breaks[n++] = 0;
  for (;;) {
    const a = tc();
    const b = tr();
    const t = Math.min(a, b);
    if (!(t < 1)) break;
    if (t > breaks[n - 1]) breaks[n++] = t;
    if (a <= b) kc += stepC;
    if (b <= a) kr += stepR;
  }
  breaks[n++] = 1;
  return { t: breaks, n };
}

/**
 * Length of {t in [t1, t2] : e0 + e1 t + e2 t^2 > 0}, in units of t.
 * @example lengthAbove(-1, 0, 4, 0, 1) // 0.5 (4 t^2 > 1 for t > 1/2)
 */
export function lengthAbove(e0: number, e1: number, e2: number, t1: number, t2: number): number {
  const q = (t: number) => e0 + t * (e1 + t * e2);
  // Cut [t1, t2] at the quadratic's roots inside it; each part is all above or all below.
  let r1 = NaN;
  let r2 = NaN;
  if (e2 === 0) {
    if (e1 !== 0) r1 = -e0 / e1;
  } else {
    const disc = e1 * e1 - 4 * e2 * e0;
    if (disc > 0) {
      const sq = Math.sqrt(disc);
      const k = -0.5 * (e1 + (e1 >= 0 ? sq : -sq));
      r1 = k / e2;
      r2 = k !== 0 ? e0 / k : NaN;
      if (r2 < r1) [r1, r2] = [r2, r1];
    }
  }
  // Up to three parts between t1, the roots inside, and t2 (no array: this runs per piece).
  const c1 = r1 > t1 && r1 < t2 ? r1 : r2 > t1 && r2 < t2 ? r2 : t2;
  const c2 = c1 === r1 && r2 > t1 && r2 < t2 ? r2 : t2;
  let len = 0;
  if (q(0.5 * (t1 + c1)) > 0) len += c1 - t1;
  if (c1 < t2 && q(0.5 * (c1 + c2)) > 0) len += c2 - c1;
  if (c2 < t2 && q(0.5 * (c2 + t2)) > 0) len += t2 - c2;
  return len;
}
