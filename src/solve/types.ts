import type { DemGrid } from "../dem/grid.js";
import type { XY } from "../layout/types.js";

/** Station status, as stored in `StationProfile.status`. */
export const STATUS_OK = 0;
export const STATUS_DETAIL_LIMITED = 1;
export const STATUS_UNFLYABLE = 2;
export type StationStatusName = "ok" | "detail-limited" | "unflyable";
export const STATUS_NAMES: readonly StationStatusName[] = ["ok", "detail-limited", "unflyable"];

/** Cause bits, as stored in `StationProfile.cause`: which bound cut the detail band. */
export const CAUSE_CEILING = 1;
export const CAUSE_CLEARANCE = 2;
export const CAUSE_CLIMB = 4;
export const CAUSE_NODATA = 8;
/** The zone's own relief is wider than the band: no single height gives the whole zone its GSD. */
export const CAUSE_RELIEF = 16;

export type CeilingReference = "ground" | "surface" | "takeoff";

export interface SolverOptions {
  ceiling: { heightM: number; reference: CeilingReference };
  /** Ground height (AMSL) at the take-off point, for the `takeoff` ceiling. */
  takeoffGroundM: number;
  /**
   * Clearance floor: minM + obstacleMarginM + demAccuracyM above the highest ground within
   * safetyRadiusM (demAccuracyM: the DEM's stated vertical accuracy, height the floor cannot trust).
   */
  clearance: { minM: number; safetyRadiusM: number; obstacleMarginM: number; demAccuracyM?: number };
  aircraft: {
    type: "multirotor" | "fixed-wing";
    /** Ground speed on photo legs (already capped by trigger interval and blur). */
    speedMps: number;
    /** Transit speed (cruise). */
    transitSpeedMps: number;
    minSpeedMps: number;
    maxClimbMps: number;
    maxDescentMps: number;
  };
  /** Heights above ground giving the band's finest and coarsest GSD: H_min = low GSD / ifov, H_max = high GSD / ifov. */
  band: { hMinM: number; hMaxM: number; hTargetM: number };
  /** Half the strip spacing: the across-track half-width of each strip's own zone. */
  zoneHalfAcrossM: number;
  /**
   * Along-track half-length of each station's zone: half the trigger distance, so a
   * station's band covers the ground for which the photo taken there is the most
   * nadir (default: half the station step).
   */
  zoneHalfAlongM?: number;
  /** Station spacing along legs, metres (DEM cell size or finer). */
  stationStepM: number;
  /**
   * Spacing of the stations that may hold a waypoint (a vertex lattice along
   * each leg), metres; gates are checked at every station regardless. Default
   * DEFAULT_VERTEX_STEP_M (solveLegs); the station step or less: every station.
   */
  vertexStepM?: number;
  onConflict: "skip" | "clearance";
  /** Height to assume where the DEM has no data; undefined: nodata is unflyable. */
  assumeGroundM?: number;
  /**
   * A way around obstacles for transits (connectors, legs to and from take-off,
   * bridges over a strip's unflyable stretch): the polyline [a, ..., b] when the
   * straight segment from a to b enters a keep-out zone, or (`unknownOnStraight`:
   * the solver found the straight leg's floor needs unknown ground) passes over or
   * near unknown ground, and a way around exists; else null (the leg flies straight,
   * warned where it crosses unknown ground). Undefined: every transit is straight.
   */
  routeAround?: (a: XY, b: XY, unknownOnStraight: boolean) => XY[] | null;
  /** Camera pixel pitch / focal length (GSD = height * ifov); lets input errors say which GSD range is legal. */
  ifov?: number;
  /**
   * A terrain model (bare earth) on the same cells as the solver's grid, when that grid is a
   * surface model: the `ground` and `surface` ceilings are measured from it (the legal limits
   * refer to the terrain), while clearance and the detail band stay on the surface (what the
   * aircraft can hit, what the camera sees). Undefined: everything on the one grid.
   */
  terrain?: DemGrid;
}

/** Per-station corridor and result along one leg (all heights metres AMSL). */
export interface StationProfile {
  s: Float64Array;
  x: Float64Array;
  y: Float64Array;
  /** Ground straight below (NaN where nodata). */
  groundM: Float64Array;
  /** Terrain (SolverOptions.terrain) straight below, NaN where nodata; absent without a terrain model. */
  terrainM?: Float64Array;
  /** Clearance floor; NaN where the ground it needs is unknown (nodata or off the DEM). */
  hardLowM: Float64Array;
  /**
   * Where hardLowM is NaN: the same floor over the cells that have data (NaN where none
   * do). A stand-in for flying over unknown ground, which the plan warns about; absent
   * when the whole leg's ground is known.
   */
  knownLowM?: Float64Array;
  hardHighM: Float64Array;
  bandLowM: Float64Array;
  bandHighM: Float64Array;
  /** Altitude the flown path has at this station. */
  altitudeM: Float64Array;
  status: Uint8Array;
  cause: Uint8Array;
}

export interface Waypoint {
  x: number;
  y: number;
  /** Along-track distance on its leg. */
  s: number;
  altitudeAmslM: number;
  groundAmslM: number;
  heightAboveGroundM: number;
  /** Terrain height straight below when a terrain model is given beside a surface model (NaN where unknown). */
  terrainAmslM?: number;
  /** Ground speed on the leg segment that ends at this waypoint (0 for a leg's first waypoint). */
  speedMps: number;
}

export interface SolvedLeg {
  kind: "strip" | "transit";
  strip: number;
  from: XY;
  to: XY;
  /** Vertices of the altitude profile, first and last included. */
  waypoints: Waypoint[];
  profile: StationProfile;
  lengthM: number;
  timeS: number;
  /** True for a transit that bridges a stretch of a strip skipped as unflyable (`onConflict: "skip"`). */
  conflictGap?: boolean;
  /**
   * A bridge routed around unknown ground instead of along its strip: the strip's own
   * stations it skips (unflyable, on the strip's line, as a straight bridge's profile
   * would be), for whatever maps the strip's unflyable stretch. Absent otherwise.
   */
  skipped?: StationProfile;
  /**
   * A transit that replaces unflyable stretches at strip ends over unknown ground: those
   * stretches' profiles (on their strips' lines), for whatever maps and counts them.
   */
  trimmed?: StationProfile[];
}

export interface SolveWarning {
  code: string;
  message: string;
  /** The strip (or the strip a transit leads into) the warning is about, when it is about one. */
  strip?: number;
}

export interface SolveResult {
  legs: SolvedLeg[];
  warnings: SolveWarning[];
  /** Count of stations by status over all strip legs. */
  counts: { ok: number; detailLimited: number; unflyable: number };
}
