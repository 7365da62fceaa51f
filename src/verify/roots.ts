/**
 * Real roots of a polynomial of degree <= 4 inside an interval, without
 * missing any: between two consecutive critical points (roots of the
 * derivative, found the same way one degree lower) the polynomial is
 * monotone, so each sign change holds exactly one root, found by bisection.
 * No closed forms (the quartic's are unstable) and no allocation per call:
 * one scratch set per degree.
 */

const MAX_DEGREE = 4;
/** Bisection stops at this width in t; callers use |t| <= 0.42 (see trigMax.ts). */
const ROOT_WIDTH = 1e-12;

// Scratch per degree: the recursion goes one degree down per level, so levels never share.
const derivs: Float64Array[] = [];
const breaks: Float64Array[] = [];
const critRoots: Float64Array[] = [];
for (let d = 0; d <= MAX_DEGREE; d++) {
  derivs.push(new Float64Array(MAX_DEGREE + 1));
  breaks.push(new Float64Array(MAX_DEGREE + 2));
  critRoots.push(new Float64Array(MAX_DEGREE + 2));
}

/**
 * Horner evaluation of sum c[k] t^k, k = 0..deg.
 * @example polyEval(Float64Array.of(1, 2, 3), 2, 2) // 17
 */
export function polyEval(c: Float64Array, deg: number, t: number): number {
  let v = c[deg];
  for (let k = deg - 1; k >= 0; k--) v = v * t + c[k];
  return v;
}

/**
 * Writes the real roots of sum c[k] t^k (k <= deg <= 4) lying in [lo, hi] to
 * `out` in increasing order and returns how many. Roots of even multiplicity
 * (no sign change) are not reported: callers want sign changes of a derivative.
 * @example const c = Float64Array.of(-1, 0, 1, 0, 0); rootsInInterval(c, 2, -2, 2, out) // 2 (-1 and 1)
 */
export function rootsInInterval(c: Float64Array, deg: number, lo: number, hi: number, out: Float64Array): number {
  if (deg > MAX_DEGREE) throw new Error("rootsInInterval: degree above 4");
  if (deg <= 0) return 0;
  // Break points: lo, the critical points inside, hi. Degree 1 is monotone already.
  const pts = breaks[deg];
  let np = 0;
  pts[np++] = lo;
  if (deg >= 2) {
    const d = derivs[deg];
    for (let k = 0; k < deg; k++) d[k] = (k + 1) * c[k + 1];
    const tmp = critRoots[deg];
    const n = rootsInInterval(d, deg - 1, lo, hi, tmp);
    for (let i = 0; i < n; i++) if (tmp[i] > lo && tmp[i] < hi) pts[np++] = tmp[i];
  }
  pts[np++] = hi;
  let n = 0;
  let fa = polyEval(c, deg, pts[0]);
  for (let k = 0; k + 1 < np; k++) {
    let a = pts[k];
    let b = pts[k + 1];
    const fb = polyEval(c, deg, b);
    if (fa === 0) {
      if (n === 0 || out[n - 1] !== a) out[n++] = a;
    } else if (fb !== 0 && (fa < 0) !== (fb < 0)) {
      let fLo = fa;
      while (b - a > ROOT_WIDTH) {
        const m = 0.5 * (a + b);
        const fm = polyEval(c, deg, m);
        if (fm === 0) {
          a = b = m;
          break;
        }
        if ((fm < 0) === (fLo < 0)) {
          a = m;
          fLo = fm;
        } else b = m;
      }
      out[n++] = 0.5 * (a + b);
    }
    fa = fb;
  }
  if (fa === 0 && (n === 0 || out[n - 1] !== pts[np - 1])) out[n++] = pts[np - 1];
  return n;
}
