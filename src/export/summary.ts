/**
 * summary.json: the numbers a pilot checks first, the independent
 * assessment's GSD and image statistics, warnings, and the usual cautions.
 */
import type { AssessmentStats } from "../assess/types.js";
import type { VerticalDatum } from "../dem/grid.js";
import type { CeilingReference, SolveWarning } from "../solve/types.js";
import type { Flight } from "../route/flights.js";
import type { WaypointRow } from "./rows.js";

export interface SummaryInput {
  name: string;
  flights: readonly Flight[];
  rows: readonly WaypointRow[];
  /** Number of exposures placed. */
  photos: number;
  headingDeg: number;
  lineSpacingM: number;
  triggerDistanceM: number;
  /** Strip ground speed and the limit that set it (e.g. "aircraft", "trigger interval", "motion blur"). */
  speed: { speedMps: number; limit: string };
  /** The GSD band asked for, cm/px. */
  gsdBandCm: { target: number; low: number; high: number };
  stats: AssessmentStats;
  ceiling: { heightM: number; reference: CeilingReference };
  verticalDatum: VerticalDatum;
  takeoff: { lon: number; lat: number; groundAmslM: number };
  warnings: readonly (string | SolveWarning)[];
  /** Replaces the standard CAUTIONS below (e.g. one shared list for all outputs); the ceiling caution stays first. */
  cautions?: readonly string[];
}

export interface Summary {
  name: string;
  strips: number;
  waypoints: number;
  photos: number;
  flights: number;
  batteries: number;
  perFlight: { flight: number; strips: number[]; waypoints: number; pathLengthM: number; flightTimeS: number }[];
  pathLengthM: number;
  flightTimeS: number;
  headingDeg: number;
  lineSpacingM: number;
  triggerDistanceM: number;
  speedMps: number;
  speedLimit: string;
  gsdCm: { target: number; low: number; high: number; min: number; p5: number; median: number; p95: number; max: number };
  withinBandPct: number;
  images: { min: number; median: number };
  flagged: { cells: number; areaM2: number; byKind: Record<string, { cells: number; areaM2: number; pct: number }> };
  ceiling: { heightM: number; reference: CeilingReference };
  verticalDatum: VerticalDatum;
  takeoff: { lon: number; lat: number; groundAmslM: number };
  warnings: string[];
  cautions: string[];
}

/** The cautions every plan carries; the plan's own ceiling caution is added in front. */
export const CAUTIONS: readonly string[] = [
  "gsdplan plans; the pilot in command decides.",
  "Fly within the law where you are, with the permissions it requires.",
  "Check airspace and temporary restrictions before every flight.",
  "The DEM is not a survey of obstacles: a bare-earth model ignores trees, masts, wires and buildings.",
  "DEM heights carry vertical errors (several metres or more for global models): keep the clearance margin accordingly.",
  "Keep visual line of sight where it is required.",
  "Verify the first waypoint heights on site before flying the plan.",
];

const r2 = (v: number) => (Number.isFinite(v) ? Math.round(v * 100) / 100 : v);

const REFERENCE_WORDS: Record<CeilingReference, string> = {
  ground: "the ground straight below",
  surface: "the closest terrain surface",
  takeoff: "the take-off point",
};

/**
 * Builds the summary object (write it with summaryJson).
 *
 * @example summaryJson(buildSummary(input)) // written as summary.json
 */
export function buildSummary(s: SummaryInput): Summary {
  const strips = new Set<number>();
  for (const f of s.flights) for (const l of f.legs) if (l.kind === "strip") strips.add(l.strip);
  const warnings = s.warnings.map((w) => (typeof w === "string" ? w : w.message));
  if (s.verticalDatum === "unknown" || s.verticalDatum === "other") {
    warnings.push(
      `the DEM's vertical datum is ${s.verticalDatum}: its heights were taken as above mean sea level; confirm it, or give demVerticalDatum`,
    );
  }
  const st = s.stats;
  return {
    name: s.name,
    strips: strips.size,
    waypoints: s.rows.length,
    photos: s.photos,
    flights: s.flights.length,
    batteries: s.flights.length,
    perFlight: s.flights.map((f) => ({
      flight: f.index,
      strips: f.strips,
      waypoints: f.waypoints,
      pathLengthM: r2(f.lengthM),
      flightTimeS: r2(f.timeS),
    })),
    pathLengthM: r2(s.flights.reduce((a, f) => a + f.lengthM, 0)),
    flightTimeS: r2(s.flights.reduce((a, f) => a + f.timeS, 0)),
    headingDeg: r2(s.headingDeg),
    lineSpacingM: r2(s.lineSpacingM),
    triggerDistanceM: r2(s.triggerDistanceM),
    speedMps: r2(s.speed.speedMps),
    speedLimit: s.speed.limit,
    gsdCm: {
      target: s.gsdBandCm.target,
      low: r2(s.gsdBandCm.low),
      high: r2(s.gsdBandCm.high),
      min: r2(st.gsdCm.min),
      p5: r2(st.gsdCm.p5),
      median: r2(st.gsdCm.median),
      p95: r2(st.gsdCm.p95),
      max: r2(st.gsdCm.max),
    },
    withinBandPct: r2(st.withinBandPct),
    images: { min: st.images.min, median: st.images.median },
    flagged: {
      cells: st.flagged.cells,
      areaM2: r2(st.flagged.areaM2),
      byKind: Object.fromEntries(
        Object.entries(st.flagged.byKind).map(([k, v]) => [k, { cells: v.cells, areaM2: r2(v.areaM2), pct: r2(v.pct) }]),
      ),
    },
    ceiling: { ...s.ceiling },
    verticalDatum: s.verticalDatum,
    takeoff: { lon: s.takeoff.lon, lat: s.takeoff.lat, groundAmslM: r2(s.takeoff.groundAmslM) },
    warnings,
    cautions: [
      `The ceiling of ${s.ceiling.heightM} m above ${REFERENCE_WORDS[s.ceiling.reference]} is a check, not legal advice: local rules and special zones override it.`,
      ...(s.cautions ?? CAUTIONS),
    ],
  };
}

/** JSON text of the summary (NaN becomes null, as JSON has no NaN). */
export function summaryJson(s: Summary): string {
  return JSON.stringify(s, null, 2) + "\n";
}
