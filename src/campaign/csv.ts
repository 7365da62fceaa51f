/**
 * campaign.csv: one row per site, in the campaign file's order.
 */
import { STATUS_TEXT, type SiteOutcome } from "./types.js";

/** The columns of campaign.csv, in order. */
export const CAMPAIGN_CSV_COLUMNS = [
  "name",
  "area_m2",
  "flights",
  "batteries",
  "photos",
  "flight_time_s",
  "within_band_pct",
  "flagged_pct",
  "status",
  "error",
] as const;

/**
 * One CSV field as RFC 4180 section 2 writes it: fields holding a comma, a double
 * quote, CR or LF are enclosed in double quotes, and a double quote inside is doubled.
 * @example csvField('North "A", upper') // '"North ""A"", upper"'
 */
export function csvField(value: string | number | undefined): string {
  const s = value === undefined ? "" : String(value);
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/**
 * The text of campaign.csv: a header and one row per site, CRLF line ends (RFC 4180,
 * as waypoints.csv). Figures are summary.json's, as written; a failed site has empty
 * figures and its one-line error.
 * @example campaignCsv([{ name: "a", outcome: { status: "failed", error: "dem: not found" } }]).split("\r\n")[1]
 *   // "a,,,,,,,,failed,dem: not found"
 */
export function campaignCsv(rows: readonly { name: string; outcome: SiteOutcome }[]): string {
  const lines = [CAMPAIGN_CSV_COLUMNS.join(",")];
  for (const { name, outcome } of rows) {
    const f = outcome.status === "failed" ? undefined : outcome.figures;
    const cells = [
      name,
      f?.areaM2,
      f?.flights,
      f?.batteries,
      f?.photos,
      f?.flightTimeS,
      f?.withinBandPct,
      f?.flaggedPct,
      STATUS_TEXT[outcome.status],
      outcome.status === "failed" ? outcome.error : "",
    ];
    lines.push(cells.map(csvField).join(","));
  }
  return lines.join("\r\n") + "\r\n";
}
