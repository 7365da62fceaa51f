/**
 * Site outlines for the overview map, in WGS84: the `site` layer of a planned site's
 * plan.geojson, or for a site that failed, its outline file read as the planner would.
 */
import { readFile } from "node:fs/promises";
import { parseSiteText } from "../layout/site-parse.js";

/** Polygons of [lon, lat] rings, the first ring of each the outer one. */
export type LonLatPolygons = number[][][][];

/**
 * The polygons of the features whose `layer` property is "site" in a plan.geojson text.
 * @example siteOutlineFromPlanGeoJson(text).length // 1 for a one-polygon site
 */
export function siteOutlineFromPlanGeoJson(text: string): LonLatPolygons {
  const fc = JSON.parse(text) as { features?: { geometry?: { type: string; coordinates: unknown }; properties?: { layer?: string } }[] };
  const out: LonLatPolygons = [];
  for (const f of fc.features ?? []) {
    if (f.properties?.layer !== "site" || !f.geometry) continue;
    if (f.geometry.type === "Polygon") out.push(f.geometry.coordinates as number[][][]);
    else if (f.geometry.type === "MultiPolygon") out.push(...(f.geometry.coordinates as number[][][][]));
  }
  return out;
}

/**
 * A site's outline for the map, or an empty list when none can be read (a failed
 * site's outline file may itself be what failed).
 * @example await siteOutline({ planGeoJson: "out/gorge/plan.geojson" })
 */
export async function siteOutline(from: { planGeoJson?: string; areaFile?: string }): Promise<LonLatPolygons> {
  try {
    if (from.planGeoJson) return siteOutlineFromPlanGeoJson(await readFile(from.planGeoJson, "utf8"));
    if (from.areaFile) return parseSiteText(await readFile(from.areaFile, "utf8"), from.areaFile).polygons;
  } catch {
    // The map is an overview: a site without an outline is still listed in the table.
  }
  return [];
}
