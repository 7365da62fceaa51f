/**
 * The independent check of a written plan: from the waypoint list alone, the
 * DEM in its own CRS and the plan's limits, re-derive every promise the plan
 * makes and report each breach with its place, size and limit. It shares no
 * code with the solver or the assessment: only the DEM reading (src/dem), the
 * plan-file reading (src/plan/options.ts) and the keep-out file reading
 * (src/route/zoneFile.ts, no geometry) are common.
 */
import type { DemGrid } from "../dem/grid.js";
import { checkGroundCeilingLeg, checkSurfaceCeilingLeg, checkTakeoffCeilingLeg } from "./ceiling.js";
import { TOLERANCE_M, checkClearanceLeg, emptyFinding, type LegFinding, type LegSpec } from "./clearance.js";
import { clearanceFloorM } from "./limits.js";
import { KEEP_OUT_TOLERANCE_M, keepOutHits } from "./keepOut.js";
import { checkUnknownLeg, type UnknownFinding } from "./nodata.js";
import { flightPath, type FlightPath } from "./path.js";
import { TAKEOFF_TOLERANCE_M, flightSpans, groundMismatches, rateBreaches, shortDistanceM } from "./points.js";
import { groundAtIndex, knownGroundAtIndex, makeSurface } from "./surface.js";
import type { Breach, VerifyDem, VerifyLimitName, VerifyLimits, VerifyResult, VerifyRow } from "./types.js";

export const LIMIT_ORDER: readonly VerifyLimitName[] = ["ground", "clearance", "ceiling", "climb", "descent", "nodata", "keepOut", "takeoff", "band"];

const CEILING_WORDS = {
  ground: "above the ground straight below",
  surface: "from the closest point of the terrain surface",
  takeoff: "above the take-off point's ground",
} as const;

/**
 * Checks waypoint rows against the plan's limits on a DEM window in the DEM's
 * own CRS (as readWindow returns it). Pure: no files, no clock. With `dem.terrain` (a
 * terrain model on the same cells beside a surface model) the ceiling and the take-off
 * ground are measured on the terrain; clearance, ground figures and band on the surface.
 * @example
 * const { rows, limits, dem } = await loadVerifyInputs("out", "plan.yaml");
 * const result = verifyWaypoints(rows, limits, dem);
 * result.ok // true when no promise is broken
 */
export function verifyWaypoints(rows: readonly VerifyRow[], limits: VerifyLimits, dem: VerifyDem): VerifyResult {
  const s = makeSurface(dem, limits.assumeGroundM);
  // The legal ceilings refer to the terrain (bare earth): checked on it when given, same index space.
  const t = dem.terrain ? makeSurface(onSameCells(dem.terrain, dem), limits.assumeGroundM) : s;
  const path = flightPath(rows, s);
  const floorM = clearanceFloorM(limits);
  const R = limits.safetyRadiusM;
  const breaches: Breach[] = [];
  const warnings: Breach[] = [];
  const spans = flightSpans(path);
  const takeoffGround = new Float64Array(path.n);
  for (const f of spans) for (let i = f.first; i <= f.last; i++) takeoffGround[i] = groundAtIndex(t, path.c[f.first], path.r[f.first]);

  const finding = emptyFinding();
  const unknown: UnknownFinding = { belowM: 0, nearM: 0, firstT: NaN };
  const leg: LegSpec = { ca: 0, ra: 0, cb: 0, rb: 0, za: 0, zb: 0, sx: 1, sy: 1, lengthM: 0 };
  let legs = 0;
  let pathLengthM = 0;
  let samples = 0;
  let unresolved = 0;
  for (let i = 0; i + 1 < path.n; i++) {
    if (!path.isLeg[i]) continue;
    legs++;
    pathLengthM += path.lengthM[i];
    leg.ca = path.c[i];
    leg.ra = path.r[i];
    leg.cb = path.c[i + 1];
    leg.rb = path.r[i + 1];
    leg.za = path.z[i];
    leg.zb = path.z[i + 1];
    leg.sx = path.sx[i];
    leg.sy = path.sy[i];
    leg.lengthM = path.lengthM[i];
    const exempt = path.takeoffVertical[i] === 1;

    if (!exempt) {
      checkClearanceLeg(s, leg, floorM, R, finding);
      samples += finding.samples;
      unresolved += finding.unresolved;
      if (finding.worst > TOLERANCE_M) {
        const zAt = leg.za + (leg.zb - leg.za) * finding.worstT;
        breaches.push(
          legBreach(path, i, "clearance", finding, finding.worst, (where) =>
            `${where}: ${m(finding.worst)} under the clearance floor (altitude ${m(zAt)}; highest ground within ${num(R)} m ${m(finding.worstRef)} + ${num(floorM)} m = ${m(finding.worstRef + floorM)}) over ${m(finding.lengthM)} of the leg`,
          ),
        );
      }
    }

    const ref = limits.ceilingReference;
    if (ref === "ground") checkGroundCeilingLeg(t, leg, limits.ceilingM, finding);
    else if (ref === "surface") checkSurfaceCeilingLeg(t, leg, limits.ceilingM, finding);
    else if (takeoffGround[i] === takeoffGround[i]) checkTakeoffCeilingLeg(leg, takeoffGround[i], limits.ceilingM, finding);
    else finding.worst = -Infinity;
    samples += finding.samples;
    unresolved += finding.unresolved;
    if (finding.worst > TOLERANCE_M) {
      const zAt = leg.za + (leg.zb - leg.za) * finding.worstT;
      const detail =
        ref === "surface"
          ? `closest terrain ${m(finding.worstRef)} away`
          : `${ref === "ground" ? "ground" : "take-off ground"} ${m(finding.worstRef)}, limit ${m(finding.worstRef + limits.ceilingM)}`;
      breaches.push(
        legBreach(path, i, "ceiling", finding, finding.worst, (where) =>
          `${where}: ${m(finding.worst)} over the ceiling of ${num(limits.ceilingM)} m ${CEILING_WORDS[ref]} (altitude ${m(zAt)}; ${detail}) over ${m(finding.lengthM)} of the leg`,
        ),
      );
    }

    checkUnknownLeg(s, leg, R, !exempt, unknown);
    if (unknown.belowM > 0 || unknown.nearM > 0 || unknown.firstT === unknown.firstT) {
      const f: LegFinding = { ...emptyFinding(), worstT: unknown.firstT === unknown.firstT ? unknown.firstT : 0, lengthM: Math.max(unknown.nearM, unknown.belowM) };
      const assumed = limits.assumeGroundM !== null;
      const b = legBreach(path, i, "nodata", f, f.lengthM, (where) =>
        `${where}: unknown ground (no DEM data or outside the DEM) straight below for ${m(unknown.belowM)} and within the ${num(R)} m safety radius for ${m(unknown.nearM)} of the leg` +
        (assumed ? `; flown on the assumed ground height of ${num(limits.assumeGroundM!)} m` : ""),
      );
      (assumed ? warnings : breaches).push(b);
    }
  }

  // Keep-out zones: every leg (take-off moves too: a take-off inside a zone is in it), exact per chord.
  const zones = limits.keepOutZones ?? [];
  for (const h of keepOutHits(path, zones)) {
    const z = zones[h.zone];
    const f: LegFinding = { ...emptyFinding(), worstT: h.t, lengthM: h.lengthM };
    const name = JSON.stringify(z.name);
    const buffer = z.bufferM > 0 ? `its ${num(z.bufferM)} m buffer` : "it";
    const b = legBreach(path, h.leg, "keepOut", f, h.depthM, (where) =>
      h.insideM > 0
        ? `${where}: enters keep-out zone ${name}, ${m(h.insideM)} inside its outline${z.bufferM > 0 ? ` (${m(h.depthM)} inside its ${num(z.bufferM)} m buffer)` : ""}, over ${m(h.lengthM)} of the leg`
        : `${where}: passes ${m(-h.insideM)} from keep-out zone ${name}, ${m(h.depthM)} inside ${buffer}, over ${m(h.lengthM)} of the leg`,
    );
    b.zone = z.name;
    breaches.push(b);
  }

  for (const r of rateBreaches(path, limits.maxClimbMps, limits.maxDescentMps)) {
    const f: LegFinding = { ...emptyFinding(), worstT: 0.5, lengthM: path.lengthM[r.leg] };
    const dz = path.z[r.leg + 1] - path.z[r.leg];
    const speed = path.rows[r.leg + 1].speedMps;
    breaches.push(
      legBreach(path, r.leg, r.climb ? "climb" : "descent", f, r.rateMps / r.limitMps, (where) =>
        `${where}: ${r.climb ? "climbs" : "descends"} at ${r.rateMps.toFixed(2)} m/s, ${(r.rateMps / r.limitMps).toFixed(4)} x the limit of ${num(r.limitMps)} m/s (${m(Math.abs(dz))} over ${m(path.lengthM[r.leg])} at ${speed.toFixed(2)} m/s)`,
      ),
    );
  }

  const ellipsoidal = dem.verticalDatum === "ellipsoid";
  for (const g of groundMismatches(path, s, ellipsoidal)) {
    const row = path.rows[g.row];
    breaches.push(
      pointBreach(path, g.row, "ground", g.sizeM,
        `${pointWhere(path, g.row)}: the list says ground ${mOrEmpty(g.listGroundM)}, height above ground ${mOrEmpty(g.listAglM)}; the DEM (bilinear between cell centres) gives ${m(g.demGroundM)} and ${m(g.demAglM)}` +
          (ellipsoidal ? ` (ellipsoidal DEM: list ground taken back to the ellipsoid with N = ${m(row.altitudeEllipsoidM - row.altitudeAmslM)})` : ""),
      ),
    );
  }

  for (const f of spans) {
    const a = path.rows[f.first];
    const b = path.rows[f.last];
    const apart = shortDistanceM(a.longitude, a.latitude, b.longitude, b.latitude);
    if (apart > TAKEOFF_TOLERANCE_M) {
      breaches.push(pointBreach(path, f.last, "takeoff", apart, `${pointWhere(path, f.last)}: flight ${f.flight} ends ${m(apart)} from where it started (row ${f.first + 1})`));
    }
    if (limits.takeoff) {
      const off = shortDistanceM(a.longitude, a.latitude, limits.takeoff[0], limits.takeoff[1]);
      if (off > TAKEOFF_TOLERANCE_M) {
        breaches.push(pointBreach(path, f.first, "takeoff", off, `${pointWhere(path, f.first)}: flight ${f.flight} starts ${m(off)} from the plan's take-off point (${limits.takeoff[0]}, ${limits.takeoff[1]})`));
      }
    }
    if (knownGroundAtIndex(s, path.c[f.first], path.r[f.first]) !== knownGroundAtIndex(s, path.c[f.first], path.r[f.first])) {
      breaches.push(pointBreach(path, f.first, "takeoff", 0, `${pointWhere(path, f.first)}: the take-off point of flight ${f.flight} has no DEM data under it`));
    }
  }

  // Detail, not safety: a strip waypoint whose nadir GSD over the ground straight below
  // leaves the band. The plan flags such ground cell by cell; a list edited by hand may not.
  if (limits.band) {
    const { lowGsdCm, highGsdCm, gsdCmPerM } = limits.band;
    for (let i = 0; i < path.n; i++) {
      if (path.rows[i].segment !== "strip") continue;
      const g = groundAtIndex(s, path.c[i], path.r[i]);
      const gsd = (path.z[i] - g) * gsdCmPerM;
      if (!(gsd === gsd) || (gsd >= lowGsdCm * (1 - 1e-3) && gsd <= highGsdCm * (1 + 1e-3))) continue;
      warnings.push(pointBreach(path, i, "band", gsd,
        `${pointWhere(path, i)}: nadir GSD ${gsd.toFixed(2)} cm/px over the ground straight below, outside the band ${lowGsdCm.toFixed(2)}-${highGsdCm.toFixed(2)} cm/px (detail, not safety)`));
    }
  }

  // Stable sort: within a limit and a row, breaches keep the order found (keep-out zones in file order).
  const order = (b: Breach) => LIMIT_ORDER.indexOf(b.limit) * 1e9 + b.fromRow;
  breaches.sort((x, y) => order(x) - order(y));
  warnings.sort((x, y) => order(x) - order(y));
  return {
    ok: breaches.length === 0,
    breaches,
    warnings,
    checked: { rows: path.n, flights: spans.length, legs, pathLengthM, samples, clearanceFloorM: floorM, toleranceM: TOLERANCE_M, unresolvedLeaves: unresolved,
      keepOutZones: zones.length, keepOutToleranceM: KEEP_OUT_TOLERANCE_M },
  };
}

/** The terrain window, refused unless it lies on the surface window's cells (one index space for both). */
function onSameCells(terrain: DemGrid, dem: DemGrid): DemGrid {
  const a = terrain.transform, b = dem.transform;
  if (terrain.width !== dem.width || terrain.height !== dem.height || a.x0 !== b.x0 || a.y0 !== b.y0 || a.dx !== b.dx || a.dy !== b.dy) {
    throw new Error("verifyWaypoints: the terrain model must be on the DEM window's cells");
  }
  return terrain;
}

function legBreach(path: FlightPath, i: number, limit: VerifyLimitName, f: LegFinding, sizeM: number, text: (where: string) => string): Breach {
  const t = f.worstT;
  const [lon, lat] = path.toLonLat(path.c[i] + (path.c[i + 1] - path.c[i]) * t, path.r[i] + (path.r[i + 1] - path.r[i]) * t);
  const to = path.rows[i + 1];
  const where = `flight ${to.flight}, strip ${to.strip}, row ${i + 1} -> row ${i + 2} at ${deg(lon)}, ${deg(lat)}`;
  return { limit, flight: to.flight, strip: to.strip, fromRow: i + 1, toRow: i + 2, longitude: lon, latitude: lat, sizeM, lengthM: f.lengthM, message: text(where) };
}

function pointBreach(path: FlightPath, i: number, limit: VerifyLimitName, sizeM: number, message: string): Breach {
  const row = path.rows[i];
  return { limit, flight: row.flight, strip: row.strip, fromRow: i + 1, toRow: i + 1, longitude: row.longitude, latitude: row.latitude, sizeM, lengthM: 0, message };
}

function pointWhere(path: FlightPath, i: number): string {
  const row = path.rows[i];
  return `flight ${row.flight}, strip ${row.strip}, row ${i + 1} at ${deg(row.longitude)}, ${deg(row.latitude)}`;
}

const m = (v: number) => `${v.toFixed(2)} m`;
const mOrEmpty = (v: number) => (v === v ? m(v) : "(empty)");
const num = (v: number) => String(Math.round(v * 1000) / 1000);
const deg = (v: number) => v.toFixed(7);
