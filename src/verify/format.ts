/**
 * How `gsdplan verify` prints its result: one line per breach grouped by
 * limit, then what was checked, the usual caution and a one-line verdict; or
 * the JSON document other tools read.
 */
import { LIMIT_ORDER } from "./verify.js";
import type { Breach, VerifyLimits, VerifyResult } from "./types.js";

const LIMIT_TITLES: Record<string, string> = {
  ground: "ground (the list's ground or height above ground differs from the DEM by more than 0.05 m)",
  clearance: "clearance",
  ceiling: "ceiling",
  climb: "climb rate",
  descent: "descent rate",
  nodata: "unknown ground (nodata)",
  keepOut: "keep-out zones (a leg inside a zone or its buffer)",
  takeoff: "take-off",
  band: "detail band (nadir GSD at strip waypoints)",
};

export const VERIFY_CAUTION =
  "A clean check covers the DEM and the plan's limits only: the DEM is not a survey of obstacles, local rules and airspace restrictions apply, and the pilot in command decides.";

/**
 * Human-readable report.
 * @example process.stdout.write(verifyText(result, limits))
 */
export function verifyText(result: VerifyResult, limits: VerifyLimits, header?: string): string {
  const out: string[] = [];
  if (header) out.push(header);
  out.push(...groupLines(result.breaches, ""));
  if (result.warnings.length) out.push(...groupLines(result.warnings, "warning: "));
  const c = result.checked;
  out.push(
    `checked: ${c.flights} flight(s), ${c.legs} legs, ${(c.pathLengthM / 1000).toFixed(2)} km of path, ${c.samples} exact terrain evaluations; ` +
      `clearance floor ${round(c.clearanceFloorM)} m above the highest ground within ${round(limits.safetyRadiusM)} m; ` +
      `ceiling ${round(limits.ceilingM)} m (${limits.ceilingReference}); climb ${round(limits.maxClimbMps)} m/s, descent ${round(limits.maxDescentMps)} m/s; tolerance ${c.toleranceM} m` +
      (c.keepOutZones ? `; ${c.keepOutZones} keep-out zone${c.keepOutZones === 1 ? "" : "s"} (${zoneList(limits)}), tolerance ${c.keepOutToleranceM} m` : ""),
  );
  out.push(`caution: ${VERIFY_CAUTION}`);
  out.push(verdictLine(result));
  return out.join("\n") + "\n";
}

function zoneList(limits: VerifyLimits): string {
  const zones = limits.keepOutZones ?? [];
  const shown = zones.slice(0, 5).map((z) => `${JSON.stringify(z.name)} ${z.bufferM > 0 ? `buffer ${round(z.bufferM)} m` : "no buffer"}`);
  return zones.length > 5 ? `${shown.join(", ")} and ${zones.length - 5} more` : shown.join(", ");
}

function groupLines(list: readonly Breach[], prefix: string): string[] {
  const out: string[] = [];
  for (const limit of LIMIT_ORDER) {
    const of = list.filter((b) => b.limit === limit);
    if (!of.length) continue;
    const word = prefix ? (limit === "band" ? "waypoint" : "crossing") : "breach";
    out.push(`${prefix}${LIMIT_TITLES[limit]}: ${of.length} ${word}${of.length === 1 ? "" : word === "breach" ? "es" : "s"}`);
    for (const b of of) out.push(`  ${b.message}`);
  }
  return out;
}

/**
 * The last line: OK or FAIL with counts per limit.
 * @example verdictLine(result) // "verdict: FAIL, 3 breaches (clearance 2, climb 1)"
 */
export function verdictLine(result: VerifyResult): string {
  const w = result.warnings.length ? `, ${result.warnings.length} warning(s)` : "";
  if (result.ok) return `verdict: OK, no breach on ${result.checked.legs} legs${w}`;
  const counts = LIMIT_ORDER.map((l) => [l, result.breaches.filter((b) => b.limit === l).length] as const)
    .filter(([, n]) => n > 0)
    .map(([l, n]) => `${l} ${n}`)
    .join(", ");
  return `verdict: FAIL, ${result.breaches.length} breach${result.breaches.length === 1 ? "" : "es"} (${counts})${w}`;
}

/**
 * The JSON document: { ok, breaches, warnings, checked, limits }.
 * @example JSON.parse(verifyJson(result, limits)).ok
 */
export function verifyJson(result: VerifyResult, limits: VerifyLimits): string {
  const strip = (b: Breach) => ({
    limit: b.limit,
    flight: b.flight,
    strip: b.strip,
    fromRow: b.fromRow,
    toRow: b.toRow,
    longitude: b.longitude,
    latitude: b.latitude,
    sizeM: b.sizeM,
    lengthM: b.lengthM,
    ...(b.zone !== undefined ? { zone: b.zone } : {}),
    message: b.message,
  });
  // Zones by name, buffer and size: their rings are the plan's files, not the check's result.
  const shownLimits = limits.keepOutZones
    ? {
        ...limits,
        keepOutZones: limits.keepOutZones.map((z) => ({ name: z.name, bufferM: z.bufferM, polygons: z.polygons.length, vertices: z.polygons.reduce((n, p) => n + p.reduce((k, r) => k + r.length, 0), 0) })),
      }
    : limits;
  return JSON.stringify({ ok: result.ok, breaches: result.breaches.map(strip), warnings: result.warnings.map(strip), checked: result.checked, limits: shownLimits, caution: VERIFY_CAUTION }, null, 2) + "\n";
}

const round = (v: number) => Math.round(v * 1000) / 1000;
