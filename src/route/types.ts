import type { XY } from "../layout/types.js";

/**
 * A place the aircraft may not overfly: a polygon in the local frame (outer ring
 * first, then holes; any winding, closing repeat optional) and the horizontal
 * buffer to keep from it.
 */
export interface KeepOutZone {
  name: string;
  rings: XY[][];
  /** Horizontal distance to keep from the zone, metres (>= 0). */
  bufferM: number;
}

/**
 * A keep-out zone grown by its buffer: polygons (outer ring counter-clockwise
 * first, holes clockwise, no closing repeat) whose union contains every point
 * closer than `bufferM` to the zone and no point farther than
 * `bufferM + deviationM` from it.
 */
export interface BufferedZone {
  name: string;
  bufferM: number;
  /** Largest distance of the outline beyond the true buffer, metres (0 without a buffer). */
  deviationM: number;
  polygons: XY[][][];
}

/** How finely buffer arcs are cut into straight sides. */
export interface ArcOptions {
  /** Largest excess of the outline over the true buffer, metres. Default 0.5. */
  maxDeviationM?: number;
  /** The same as a share of the buffer distance; the smaller of the two applies. Default 0.02. */
  maxDeviationShare?: number;
}

/** A keep-out zone as the user drew it, on the local frame: one name, one or more polygons. */
export interface LocalKeepOut {
  name: string;
  /** Zone file base name. */
  source: string;
  bufferM: number;
  /** Polygons (outer ring first, then holes), local frame. */
  polygons: XY[][][];
}

/** What one keep-out zone did to a plan, for the summary and the report. */
export interface KeepOutZoneReport {
  name: string;
  /** Zone file base name. */
  source: string;
  bufferM: number;
  /** The zone as drawn, local-frame metres (per polygon: outer ring first, then holes). */
  polygons: XY[][][];
  /** The zone grown by its buffer: what no leg enters (the zone itself when bufferM is 0). */
  buffered: XY[][][];
  /** Site area inside the zone or its buffer, m², and its share of the site, percent. */
  siteRemovedM2: number;
  siteRemovedPct: number;
}

/** The keep-out zones of a plan (none: an empty list). */
export interface KeepOutReport {
  zones: KeepOutZoneReport[];
}
