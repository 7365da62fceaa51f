/**
 * Orientation and segment-contact predicates in floating point with a relative
 * tolerance. Exact arithmetic (Shewchuk's adaptive predicates) would decide
 * every near-collinear case, but our rings are themselves rounded offsets, so a
 * tolerance of about 1e-11 of the lengths involved (1e-7 m at 10 km) treats
 * "touching within rounding" as touching, which is what a path that may graze
 * a buffered zone needs.
 */

/** Relative tolerance of the orientation test (sine of the angle counted as zero). */
export const ORIENT_EPS = 1e-11;
/** Rounding of a coordinate, relative to its size (a few units in the last place of a double). */
const COORD_EPS = 1e-14;

/**
 * Sign of the turn a -> b -> c: 1 left (counter-clockwise), -1 right, 0 collinear within
 * ORIENT_EPS of |ab| |ac|.
 * @example orient(0, 0, 1, 0, 0, 1) // 1
 */
export function orient(ax: number, ay: number, bx: number, by: number, cx: number, cy: number): number {
  const abx = bx - ax;
  const aby = by - ay;
  const acx = cx - ax;
  const acy = cy - ay;
  const det = abx * acy - aby * acx;
  // Relative to the lengths, not to the two products (a point rounded next to a
  // nearly axis-parallel side makes both tiny), plus the rounding of coordinates
  // as large as these: a midpoint of a side 20 km from the origin is off it by
  // some 1e-12 m.
  const scale = Math.max(Math.abs(ax), Math.abs(ay), Math.abs(bx), Math.abs(by), Math.abs(cx), Math.abs(cy));
  const tol = (Math.abs(abx) + Math.abs(aby)) * (ORIENT_EPS * (Math.abs(acx) + Math.abs(acy)) + COORD_EPS * scale);
  return det > tol ? 1 : det < -tol ? -1 : 0;
}

/** Kinds of contact between two segments, as returned by `segmentContact`. */
export const NO_CONTACT = 0;
/** The segments cross at one point interior to both. */
export const CROSSING = 1;
/** They meet at one point that is an end of at least one of them. */
export const TOUCH = 2;
/** They are collinear and share more than a point: [out[0], out[1]] of the first. */
export const OVERLAP = 3;

/**
 * How segment p->q meets segment a->b. Parameters along p->q (0 at p, 1 at q)
 * go to `out`: one for CROSSING and TOUCH, two (ascending) for OVERLAP; for
 * CROSSING and TOUCH `out[1]` is the parameter along a->b.
 * @example
 * const out = new Float64Array(2);
 * segmentContact(0, 0, 2, 0, 1, -1, 1, 1, out) // CROSSING, out[0] = 0.5
 */
export function segmentContact(
  px: number, py: number, qx: number, qy: number,
  ax: number, ay: number, bx: number, by: number,
  out: Float64Array,
): number {
  const o1 = orient(px, py, qx, qy, ax, ay);
  const o2 = orient(px, py, qx, qy, bx, by);
  if (o1 * o2 > 0) return NO_CONTACT;
  const o3 = orient(ax, ay, bx, by, px, py);
  const o4 = orient(ax, ay, bx, by, qx, qy);
  if (o3 * o4 > 0) return NO_CONTACT;
  const dx = qx - px;
  const dy = qy - py;
  const ex = bx - ax;
  const ey = by - ay;
  if (o1 * o2 < 0 && o3 * o4 < 0) {
    const den = dx * ey - dy * ex;
    out[0] = ((ax - px) * ey - (ay - py) * ex) / den;
    out[1] = ((ax - px) * dy - (ay - py) * dx) / den;
    return CROSSING;
  }
  const dd = dx * dx + dy * dy;
  const ee = ex * ex + ey * ey;
  if (o1 === 0 && o2 === 0) {
    if (dd === 0) return NO_CONTACT;
    const ta = ((ax - px) * dx + (ay - py) * dy) / dd;
    const tb = ((bx - px) * dx + (by - py) * dy) / dd;
    const lo = Math.max(0, Math.min(ta, tb));
    const hi = Math.min(1, Math.max(ta, tb));
    if (lo > hi) return NO_CONTACT;
    if (lo === hi) return touch(out, lo, ee > 0 ? ((px + lo * dx - ax) * ex + (py + lo * dy - ay) * ey) / ee : 0);
    out[0] = lo;
    out[1] = hi;
    return OVERLAP;
  }
  if (o1 === 0 && dd > 0) {
    const t = ((ax - px) * dx + (ay - py) * dy) / dd;
    if (t >= 0 && t <= 1) return touch(out, t, 0);
  }
  if (o2 === 0 && dd > 0) {
    const t = ((bx - px) * dx + (by - py) * dy) / dd;
    if (t >= 0 && t <= 1) return touch(out, t, 1);
  }
  if (o3 === 0 && ee > 0) {
    const s = ((px - ax) * ex + (py - ay) * ey) / ee;
    if (s >= 0 && s <= 1) return touch(out, 0, s);
  }
  if (o4 === 0 && ee > 0) {
    const s = ((qx - ax) * ex + (qy - ay) * ey) / ee;
    if (s >= 0 && s <= 1) return touch(out, 1, s);
  }
  return NO_CONTACT;
}

function touch(out: Float64Array, t: number, s: number): number {
  out[0] = t;
  out[1] = s;
  return TOUCH;
}
