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
  return v.toLocaleString("en-GB", { minimumFractionDigits: d, maximumFractionDigits: d });
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
