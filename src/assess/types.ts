import type { Feature, MultiPolygon } from "geojson";
import type { GeoTransform } from "../dem/grid.js";
import type { GsdTally } from "./gsdTally.js";

/** One photo: camera position (local frame, metres AMSL) and the track heading. */
export interface Exposure {
  x: number;
  y: number;
  altitudeAmslM: number;
  /** Unit vector along the track (the image's along-track axis). */
  ux: number;
  uy: number;
  strip: number;
}

/**
 * Strip numbers per cell: one byte a cell when every strip number is below 256 (a site of
 * up to 255 strips, 20 MB less at 4 km2 while the assessment runs), else two.
 */
export type StripRaster = Uint8Array | Uint16Array;

/** Rasters on the (metric, working) DEM window's grid, row-major. */
export interface AssessmentRasters {
  width: number;
  height: number;
  transform: GeoTransform;
  /** Nadir GSD in cm/px from the most nadir exposure; NaN outside the site or unseen. */
  gsdCm: Float32Array;
  /** Number of exposures whose footprint covers the cell. */
  images: Uint16Array;
  /** Bitmask, see flags.ts. 0 outside the site. */
  flags: Uint16Array;
  /** 1 for cells whose centre lies inside the site. */
  inSite: Uint8Array;
  /** Strip number of the most nadir exposure seeing the cell; 0 where none (kept only with the assessment option keepNadirStrip). */
  nadirStrip?: StripRaster;
}

export interface GsdStats {
  min: number;
  p5: number;
  median: number;
  p95: number;
  max: number;
}

export interface AssessmentStats {
  siteCells: number;
  cellAreaM2: number;
  gsdCm: GsdStats;
  withinBandPct: number;
  images: { min: number; median: number };
  flagged: {
    cells: number;
    areaM2: number;
    byKind: Record<string, { cells: number; areaM2: number; pct: number }>;
    /** Site cells carrying an effect bit: coarser, finer or too few images (measured, whatever the cause). */
    effectCells: number;
  };
  perStrip: {
    strip: number;
    cells: number;
    gsdCm: GsdStats;
    withinBandPct: number;
    /** Flagged cells of this strip by flag key; pct is of the strip's own cells (added by the assessment). */
    flagged?: Record<string, { cells: number; areaM2: number; pct: number }>;
  }[];
  /** Seen site cells whose GSD is at least `cm`, when the assessment was asked for them (AssessOptions.countGsdAtLeastCm). */
  gsdAtLeast?: { cm: number; cells: number };
  /** The seen site cells' GSD tallied on a grid, when the assessment was asked for it (AssessOptions.gsdTally; gsdTally.ts). */
  gsdTally?: GsdTally;
}

/** One layer per flag kind, polygons in WGS84. */
export type FlagPolygons = Record<string, Feature<MultiPolygon, { kind: string; bit: number; areaM2: number }>>;

export interface Assessment {
  rasters: AssessmentRasters;
  stats: AssessmentStats;
  polygons: FlagPolygons;
  exposures: Exposure[];
}
