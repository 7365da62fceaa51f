/** Number formatting for the page: readable text, exact value kept in data attributes. */

/**
 * A number with a sensible count of decimals for its size.
 *
 * @example fmt(1234.567) // "1,235"; fmt(2.345) // "2.35"
 */
export function fmt(v: unknown, decimals?: number): string {
  if (typeof v !== "number") return v === null || v === undefined ? "–" : String(v);
  if (!Number.isFinite(v)) return Number.isNaN(v) ? "–" : v > 0 ? "∞" : "−∞";
  const a = Math.abs(v);
  const d = decimals ?? (Number.isInteger(v) ? 0 : a >= 100 ? 0 : a >= 10 ? 1 : 2);
  return numberFormat(d).format(v);
}

/**
 * One en-GB formatter per count of decimals, made once: `toLocaleString` builds a new
 * formatter on every call, which costs more than the formatting on a page of thousands of
 * numbers. The text is the same (toLocaleString is defined as this formatter's format).
 */
const FORMATS = new Map<number, Intl.NumberFormat>();
function numberFormat(d: number): Intl.NumberFormat {
  let f = FORMATS.get(d);
  if (!f) FORMATS.set(d, (f = new Intl.NumberFormat("en-GB", { minimumFractionDigits: d, maximumFractionDigits: d })));
  return f;
}

/** Seconds as "1 h 05 min" / "12 min 30 s". */
export function fmtDuration(s: number): string {
  if (!Number.isFinite(s)) return "–";
  const t = Math.round(s);
  const h = Math.floor(t / 3600);
  const m = Math.floor((t % 3600) / 60);
  const sec = t % 60;
  if (h > 0) return `${h} h ${String(m).padStart(2, "0")} min`;
  return `${m} min ${String(sec).padStart(2, "0")} s`;
}

/** Area in m² or ha. */
export function fmtArea(m2: number): string {
  if (!Number.isFinite(m2)) return "–";
  return m2 >= 10_000 ? `${fmt(m2 / 10_000, 2)} ha` : `${fmt(m2, 0)} m²`;
}

/**
 * Seconds as minutes and seconds, "m:ss" (minutes past 59 stay minutes: a flight is one battery).
 *
 * @example fmtMinSec(287) // "4:47"; fmtMinSec(3725) // "62:05"
 */
export function fmtMinSec(s: number): string {
  if (!Number.isFinite(s) || s < 0) return "–";
  const t = Math.round(s);
  return `${Math.floor(t / 60)}:${String(t % 60).padStart(2, "0")}`;
}

/**
 * `v.toFixed(1)`, the same text, faster: the page writes hundreds of thousands of profile
 * coordinates and toFixed's exact decimal conversion dominated drawing them. The tenths are
 * rounded from v * 10 where that product is clearly off a half (its rounding error is far
 * below the margin for |v| < 1e7); near a half, and for large or non-finite values, toFixed
 * itself decides.
 *
 * @example fixed1(2.345) // "2.3"; fixed1(-0.04) // "-0.0"
 */
export function fixed1(v: number): string {
  const a = v < 0 ? -v : v;
  if (!(a < 1e7)) return v.toFixed(1);
  const t = a * 10;
  const f = Math.floor(t);
  const frac = t - f;
  if (frac > 0.4999 && frac < 0.5001) return v.toFixed(1);
  const n = frac > 0.5 ? f + 1 : f;
  const s = Math.floor(n / 10) + "." + (n % 10);
  // toFixed signs every negative value, one that rounds to zero included ("-0.0").
  return v < 0 ? "-" + s : s;
}
