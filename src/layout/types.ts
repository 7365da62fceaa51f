import type { Polygon, MultiPolygon } from "geojson";

/** A 2-D point in the local frame, metres. */
export type XY = [number, number];

/** The site to image, in the local frame and in WGS84. */
export interface Site {
  /** Outer rings and holes in local-frame metres (GeoJSON geometry, not WGS84). */
  local: Polygon | MultiPolygon;
  /** The same site in WGS84 (RFC 7946 winding). */
  wgs84: Polygon | MultiPolygon;
  areaM2: number;
  /** Name for reports (from the file's properties or its file name). */
  name: string;
  /** Silent fixes made while reading (e.g. a ring rewound to RFC 7946 winding), for the summary. */
  notes?: string[];
  /** Present when the outline was simplified (`local`, `wgs84` and `areaM2` are of the simplified outline). */
  simplification?: SiteSimplification;
  /** Present when the site is a line buffered by half its width (a line site): strips follow the line. */
  line?: SiteLine;
}

/** The line a line site was built from. */
export interface SiteLine {
  /** The lines in the local frame, metres, consecutive repeats dropped (file order). */
  local: XY[][];
  /** Width imaged, centred on the line, metres (`lineWidthM`). */
  widthM: number;
}

/** What simplifying a site outline did. */
export interface SiteSimplification {
  /** Vertices of all rings (without closing repeats) before and after. */
  fromVertices: number;
  toVertices: number;
  /** Largest distance of a dropped vertex from the kept outline, metres (Douglas-Peucker tolerance). */
  toleranceM: number;
  /** |area after - area before| / area before, percent (both in the local frame). */
  areaChangePct: number;
}

/** One straight leg of the flight path, in flight order. */
export interface LayoutLeg {
  /** `strip`: photos are taken along it; `transit`: none. */
  kind: "strip" | "transit";
  /** 1-based strip number in flight order; a transit carries the strip it leads into. */
  strip: number;
  from: XY;
  to: XY;
  lengthM: number;
  /**
   * Strip legs only: along-track intervals [start, end] in metres from `from`
   * where no photo is needed (the strip's whole zone lies over a hole of the
   * site, e.g. an excluded courtyard). Sorted, disjoint; absent when none.
   */
  noPhotoIntervals?: [number, number][];
  /**
   * Transit legs only: the vertices between `from` and `to` of a way around
   * unknown ground (the leg flies from, via..., to in straight pieces, and
   * `lengthM` is the polyline's length). Absent: straight.
   */
  via?: XY[];
  /**
   * Strip legs only: where the photos fall when the leg continues a line's photo sequence
   * (a line cut at a block seam): at firstM + k x everyM from `from`. Absent: from `from`.
   */
  photoGrid?: { firstM: number; everyM: number };
}

export interface Layout {
  /** Strip direction, degrees clockwise from grid north in the local frame, [0, 180). */
  headingDeg: number;
  /** Distance between neighbouring strips (footprint across * (1 - side overlap)). */
  spacingM: number;
  /** Distance between exposures along a strip (footprint along * (1 - front overlap)). */
  triggerM: number;
  /** Nadir footprint across and along the track at the target height over flat ground. */
  footprintAcrossM: number;
  footprintAlongM: number;
  /** Legs in flight order, starting with the transit from take-off (the take-off point is legs[0].from). */
  legs: LayoutLeg[];
  takeoff: XY;
  /** Candidate headings and their scores, best first (for `auto`). */
  headingCandidates: { headingDeg: number; flightTimeS: number; altitudeChangeM: number; score: number }[];
  headingReason: string;
  /** Stretches of strip lines taken out at keep-out zones (absent: none). */
  keepOutCuts?: { from: XY; to: XY }[];
}

/**
 * Sample points along one leg: s is the along-track distance from the leg's
 * start, (x, y) the position. Typed arrays of equal length.
 */
export interface Stations {
  s: Float64Array;
  x: Float64Array;
  y: Float64Array;
  /** Unit vector of the leg direction. */
  ux: number;
  uy: number;
  /** Spacing between samples, metres. */
  stepM: number;
  /** Zone each station images best: half the strip spacing across, half the step along. */
  zoneHalfAcrossM: number;
  zoneHalfAlongM: number;
}
