/**
 * "Nice" round numbers (1, 2 or 5 times a power of ten) for contour intervals, scale bars
 * and axis ticks: the steps cartographers and chart makers use because they are easy to
 * read and to add up (common practice).
 */

/**
 * The nice step nearest above `span / count`.
 *
 * @example niceStep(230, 12) // 20
 */
export function niceStep(span: number, count: number): number {
  if (!(span > 0) || !(count > 0)) return 1;
  const raw = span / count;
  const k = Math.pow(10, Math.floor(Math.log10(raw)));
  const m = raw / k;
  return (m <= 1 ? 1 : m <= 2 ? 2 : m <= 5 ? 5 : 10) * k;
}

/**
 * The largest nice length not above `maxLength` (for a scale bar).
 *
 * @example niceFloor(740) // 500
 */
export function niceFloor(maxLength: number): number {
  if (!(maxLength > 0)) return 0;
  const k = Math.pow(10, Math.floor(Math.log10(maxLength)));
  const m = maxLength / k;
  return (m >= 5 ? 5 : m >= 2 ? 2 : 1) * k;
}

/**
 * Multiples of `step` inside [lo, hi].
 *
 * @example ticks(3, 27, 10) // [10, 20]
 */
export function ticks(lo: number, hi: number, step: number): number[] {
  const out: number[] = [];
  if (!(step > 0) || !Number.isFinite(lo) || !Number.isFinite(hi)) return out;
  for (let v = Math.ceil(lo / step) * step; v <= hi + step * 1e-9; v += step) out.push(+v.toPrecision(12));
  return out;
}
