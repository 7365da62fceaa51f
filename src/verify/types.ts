/**
 * Contract types of the independent plan check (`gsdplan verify`). It reads a
 * waypoint list and the plan's limits only: nothing here comes from the solver.
 */

/**
 * One waypoint row as waypoints.csv holds it (the field names match the
 * exporter's WaypointRow, so the planner can pass its own rows). Heights in
 * metres; NaN where a field is empty (a hand-edited list may leave ground and
 * height above ground empty or stale).
 */
export interface VerifyRow {
  flight: number;
  strip: number;
  index: number;
  segment: "strip" | "transit";
  longitude: number;
  latitude: number;
  altitudeAmslM: number;
  altitudeEllipsoidM: number;
  groundAmslM: number;
  heightAboveGroundM: number;
  /** Ground speed on the leg that ends at this row; 0 on a flight's first row and on vertical-only moves. */
  speedMps: number;
}

export type CeilingReference = "ground" | "surface" | "takeoff";

/**
 * The DEM window the check reads, in the DEM's own CRS, with the terrain model (`dtm`,
 * bare earth) on the same cells when one is given beside a surface model: the ceiling
 * and the take-off ground are then checked on the terrain, clearance, the ground figures
 * and the band on the surface.
 */
export type VerifyDem = import("../dem/grid.js").DemGrid & { terrain?: import("../dem/grid.js").DemGrid };

/** The limits a plan promises, in metres and metres per second. */
export interface VerifyLimits {
  clearanceM: number;
  safetyRadiusM: number;
  obstacleMarginM: number;
  /** Stated vertical accuracy of the DEM; 0 when the plan gives none. It belongs in the clearance floor. */
  demAccuracyM: number;
  ceilingM: number;
  ceilingReference: CeilingReference;
  maxClimbMps: number;
  maxDescentMps: number;
  /** Ground height assumed where the DEM has none; null: unknown ground may not be flown. */
  assumeGroundM: number | null;
  /** The plan's take-off point [longitude, latitude], or null when the layout chose it. */
  takeoff: [number, number] | null;
  /**
   * The detail band: nadir GSD limits (cm/px) and the camera's GSD per metre of height
   * (pixel pitch / focal length). Checked on strip waypoints as a finding about detail, not
   * safety (a warning). Absent when the plan file's camera cannot be resolved.
   */
  band?: { lowGsdCm: number; highGsdCm: number; gsdCmPerM: number };
  /** Places no part of the path may enter, nor come closer to than their buffer. */
  keepOutZones?: VerifyZone[];
}

/** A keep-out zone as the check reads it. */
export interface VerifyZone {
  name: string;
  /** Polygons of [lon, lat] rings (WGS84 degrees), outer ring first, then holes; any winding, closing repeat optional. */
  polygons: number[][][][];
  /** Horizontal distance to keep from the zone, metres (the zone's own, else the plan's keepOutBufferM). */
  bufferM: number;
}

export type VerifyLimitName = "ground" | "clearance" | "ceiling" | "climb" | "descent" | "nodata" | "keepOut" | "takeoff" | "band";

/** A broken promise (or, in `warnings`, a crossing of assumed ground). */
export interface Breach {
  limit: VerifyLimitName;
  flight: number;
  strip: number;
  /** 1-based data rows of the list (the header is not counted); equal for a waypoint's own problem. */
  fromRow: number;
  toRow: number;
  /** Where the breach is worst (WGS84 degrees). */
  longitude: number;
  latitude: number;
  /**
   * Metres by which the limit is broken; for climb and descent the ratio rate / limit; for
   * keepOut how far inside the zone's buffer the leg goes (buffer + depth inside the zone).
   */
  sizeM: number;
  /** Length of the leg over which the limit is broken, metres (0 for a waypoint's own problem). */
  lengthM: number;
  /** For keepOut: the zone's name. */
  zone?: string;
  message: string;
}

export interface VerifyChecked {
  rows: number;
  flights: number;
  /** Legs between consecutive rows of a flight (vertical moves included). */
  legs: number;
  /** Horizontal length of all legs, metres. */
  pathLengthM: number;
  /** Exact evaluations of the terrain (disc maxima, closest-surface distances) made to decide the path. */
  samples: number;
  /** The clearance floor above the highest ground in the safety radius, metres. */
  clearanceFloorM: number;
  /** Decision tolerance, metres: a deficit up to this is not a breach (the CSV carries centimetres). */
  toleranceM: number;
  /**
   * 1 mm pieces of a leg neither proven within the limit nor measured beyond it at their
   * midpoint (beside near-vertical DEM walls); see clearance.ts.
   */
  unresolvedLeaves: number;
  /** Keep-out zones every leg was checked against. */
  keepOutZones: number;
  /** Keep-out decision tolerance, metres: a leg may come this much nearer a zone than its buffer. */
  keepOutToleranceM: number;
}

export interface VerifyResult {
  ok: boolean;
  breaches: Breach[];
  warnings: Breach[];
  checked: VerifyChecked;
}
