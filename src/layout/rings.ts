import type { Position } from "geojson";
import type { Site } from "./types.js";

/**
 * Outer rings and all rings (outer rings and holes) of a site in local
 * metres, each closed (first position repeated last).
 * @example siteRings(site).outer.length // number of polygons
 */
export function siteRings(site: Site): { outer: Position[][]; all: Position[][] } {
  const polys = site.local.type === "Polygon" ? [site.local.coordinates] : site.local.coordinates;
  return { outer: polys.map((p) => p[0]), all: polys.flat() };
}
