/**
 * The set of lines z(d) = z0 + g d that pass through a growing sequence of
 * vertical windows [lo_m, hi_m] at offsets d_m (increasing), with the
 * gradient g in [gMin, gMax]: one sweep of the fewest-segment search.
 *
 * In the dual plane (g, z0) each window is a strip lo - g d <= z0 <= hi - g d,
 * so the set is {gLo <= g <= gHi, L(g) <= z0 <= U(g)} with L the upper
 * envelope of the lines lo_m - g d_m (convex) and U the lower envelope of
 * hi_m - g d_m (concave). Offsets only grow, so each new window's lines are
 * the steepest yet: the new lower line can only win at the left end of L and
 * the new upper line at the right end of U. Both envelopes are deques with
 * pushes at one end and pops at both (the monotone convex-hull trick), and
 * gLo, gHi only move inwards, so each window costs amortised O(1) instead of
 * a polygon clip over all vertices (on smooth bands the polygon keeps one
 * edge per station). This is the on-line line fitting between data ranges of
 * J. O'Rourke, "An on-line algorithm for fitting straight lines between data
 * ranges", Comm. ACM 24(9), 1981 (from memory), with a gradient box.
 *
 * Heights reached at the newest offset d: z0 + g d = min_m(hi_m + g (d - d_m))
 * on U is non-decreasing in g (every d - d_m >= 0), so the highest height is
 * at g = gHi on U and, likewise, the lowest at g = gLo on L.
 */
/**
 * L may exceed U by this much, metres, and still count as touching: rounding
 * of heights of a few hundred metres is ~1e-13 m, and a window met by exactly
 * one line (a gate squeezed to a point) must not be lost to it. Far below the
 * solver's own gate slack (GATE_EPS_M = 1e-6 m).
 */
const TOUCH_M = 1e-9;

export class StabbingLines {
  private lc: Float64Array;
  private ld: Float64Array;
  private uc: Float64Array;
  private ud: Float64Array;
  /** L occupies lc/ld[lh..lt], slopes -ld decreasing leftwards (ld decreasing rightwards). */
  private lh = 0;
  private lt = 0;
  /** U occupies uc/ud[uh..ut], ud increasing rightwards. */
  private uh = 0;
  private ut = 0;
  private cap: number;
  gLo = 0;
  gHi = 0;

  /** `windows`: the most windows one sweep will see (the deques never outgrow it). */
  constructor(windows: number) {
    this.cap = 2 * windows + 8;
    this.lc = new Float64Array(this.cap);
    this.ld = new Float64Array(this.cap);
    this.uc = new Float64Array(this.cap);
    this.ud = new Float64Array(this.cap);
  }

  /**
   * Start a sweep: lines through [a, b] at d = 0 with gradients in [gMin, gMax].
   * @example const w = new StabbingLines(100); w.reset(0, 1, -0.2, 0.2); w.maxAt(10) // 3
   */
  reset(a: number, b: number, gMin: number, gMax: number): boolean {
    this.lh = this.lt = this.cap - 1;
    this.lc[this.lh] = a;
    this.ld[this.lh] = 0;
    this.uh = this.ut = 0;
    this.uc[0] = b;
    this.ud[0] = 0;
    this.gLo = gMin;
    this.gHi = gMax;
    return a <= b && gMin <= gMax;
  }

  /**
   * Keep the lines with lo <= z0 + g d <= hi (d at least every earlier d;
   * pass -Infinity or Infinity for a one-sided cut). False when none is left.
   */
  cut(d: number, lo: number, hi: number): boolean {
    // A window that cuts no kept line changes nothing: most stations of a sweep.
    const a = lo > -Infinity && this.addLower(lo, d);
    const b = hi < Infinity && this.addUpper(hi, d);
    return a || b ? this.settle() : true;
  }

  /** Lowest height at offset d (d at least every cut's d) of the lines kept. */
  minAt(d: number): number {
    const g = this.gLo;
    return this.lc[this.lh] - g * this.ld[this.lh] + g * d;
  }

  /** Highest height at offset d (d at least every cut's d) of the lines kept. */
  maxAt(d: number): number {
    const g = this.gHi;
    return this.uc[this.ut] - g * this.ud[this.ut] + g * d;
  }

  /** Adds the lower line c - g d; false when it is nowhere above L on [gLo, gHi]. */
  private addLower(c: number, d: number): boolean {
    const { lc, ld } = this;
    const g0 = this.gLo;
    // The new line minus L's leftmost line falls with g: below it at gLo means never above it.
    if (c - g0 * d <= lc[this.lh] - g0 * ld[this.lh]) return false;
    while (this.lh <= this.lt) {
      const h = this.lh;
      const r = h < this.lt ? (lc[h] - lc[h + 1]) / (ld[h] - ld[h + 1]) : this.gHi;
      if (c - r * d >= lc[h] - r * ld[h]) this.lh++;
      else break;
    }
    this.lh--;
    lc[this.lh] = c;
    ld[this.lh] = d;
    return true;
  }

  /** Adds the upper line c - g d; false when it is nowhere below U on [gLo, gHi]. */
  private addUpper(c: number, d: number): boolean {
    const { uc, ud } = this;
    const g1 = this.gHi;
    if (c - g1 * d >= uc[this.ut] - g1 * ud[this.ut]) return false;
    while (this.ut >= this.uh) {
      const t = this.ut;
      const l = t > this.uh ? (uc[t - 1] - uc[t]) / (ud[t - 1] - ud[t]) : this.gLo;
      if (c - l * d <= uc[t] - l * ud[t]) this.ut--;
      else break;
    }
    this.ut++;
    uc[this.ut] = c;
    ud[this.ut] = d;
    return true;
  }

  /** Move gLo right and gHi left to where L <= U (L - U is convex: one interval). */
  private settle(): boolean {
    const { lc, ld, uc, ud } = this;
    for (;;) {
      if (!(this.gLo <= this.gHi)) return false;
      const g = this.gLo;
      const f0 = lc[this.lh] - g * ld[this.lh] - (uc[this.uh] - g * ud[this.uh]);
      if (f0 <= TOUCH_M) break;
      const rL = this.lh < this.lt ? (lc[this.lh] - lc[this.lh + 1]) / (ld[this.lh] - ld[this.lh + 1]) : Infinity;
      const rU = this.uh < this.ut ? (uc[this.uh] - uc[this.uh + 1]) / (ud[this.uh] - ud[this.uh + 1]) : Infinity;
      const r = Math.min(rL, rU, this.gHi);
      const f1 = lc[this.lh] - r * ld[this.lh] - (uc[this.uh] - r * ud[this.uh]);
      if (f1 > TOUCH_M) {
        if (r >= this.gHi) return false;
        this.gLo = r;
        if (rL <= r) this.lh++;
        if (rU <= r) this.uh++;
      } else {
        this.gLo = f1 < 0 ? g + ((r - g) * f0) / (f0 - f1) : r;
        break;
      }
    }
    for (;;) {
      if (!(this.gLo <= this.gHi)) return false;
      const g = this.gHi;
      const f0 = lc[this.lt] - g * ld[this.lt] - (uc[this.ut] - g * ud[this.ut]);
      if (f0 <= TOUCH_M) break;
      const qL = this.lh < this.lt ? (lc[this.lt - 1] - lc[this.lt]) / (ld[this.lt - 1] - ld[this.lt]) : -Infinity;
      const qU = this.uh < this.ut ? (uc[this.ut - 1] - uc[this.ut]) / (ud[this.ut - 1] - ud[this.ut]) : -Infinity;
      const l = Math.max(qL, qU, this.gLo);
      const f1 = lc[this.lt] - l * ld[this.lt] - (uc[this.ut] - l * ud[this.ut]);
      if (f1 > TOUCH_M) {
        if (l <= this.gLo) return false;
        this.gHi = l;
        if (qL >= l) this.lt--;
        if (qU >= l) this.ut--;
      } else {
        this.gHi = f1 < 0 ? g - ((g - l) * f0) / (f0 - f1) : l;
        break;
      }
    }
    return true;
  }
}
