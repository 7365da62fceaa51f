/**
 * plan.geojson, RFC 7946: WGS84 longitude/latitude, polygons wound by the
 * right-hand rule (exterior rings counterclockwise, 3.1.6), and a third
 * coordinate that is the height above the WGS84 ellipsoid (section 4), so
 * line and point altitudes here are ellipsoidal; AMSL rides in properties.
 * Every feature has a `layer` property: site, leg, waypoint, flag, takeoff,
 * keepOut (a zone as drawn) and keepOutBuffer (a zone grown by its buffer).
 */
import { rewind } from "@turf/rewind";
import type { Feature, FeatureCollection, Geometry, MultiPolygon, Polygon, Position } from "geojson";
import { ASSESSMENT_FLAG_KINDS } from "../assess/flags.js";
import { legLines, roundDeg, roundM, wgs84Polygons, type PlanExportInput } from "./layers.js";

const ALTITUDE_NOTE = "coordinate altitude: metres above the WGS84 ellipsoid (RFC 7946, section 4)";

/**
 * Builds the plan's FeatureCollection.
 *
 * @example JSON.stringify(planGeoJson(input)) // written as plan.geojson
 */
export function planGeoJson(input: PlanExportInput): FeatureCollection {
  const features: Feature[] = [];
  features.push({
    type: "Feature",
    geometry: rfc7946Polygon(input.site.wgs84),
    properties: { layer: "site", name: input.site.name, area_m2: roundM(input.site.areaM2) },
  });
  for (const l of legLines(input)) {
    features.push({
      type: "Feature",
      geometry: { type: "LineString", coordinates: l.coords.map(([lon, lat, , ell]) => [roundDeg(lon), roundDeg(lat), roundM(ell)]) },
      properties: {
        layer: "leg",
        flight: l.flight,
        strip: l.strip,
        segment: l.segment,
        speed_m_s: roundM(l.speedMps),
        length_m: roundM(l.lengthM),
        altitude_amsl_m: l.coords.map((c) => roundM(c[2])),
        altitude_reference: ALTITUDE_NOTE,
      },
    });
  }
  for (const r of input.rows) {
    features.push({
      type: "Feature",
      geometry: { type: "Point", coordinates: [roundDeg(r.longitude), roundDeg(r.latitude), roundM(r.altitudeEllipsoidM)] },
      properties: {
        layer: "waypoint",
        flight: r.flight,
        strip: r.strip,
        index: r.index,
        segment: r.segment,
        longitude: roundDeg(r.longitude),
        latitude: roundDeg(r.latitude),
        altitude_amsl_m: roundM(r.altitudeAmslM),
        altitude_ellipsoid_m: roundM(r.altitudeEllipsoidM),
        altitude_takeoff_m: roundM(r.altitudeTakeoffM),
        ground_amsl_m: roundM(r.groundAmslM),
        height_above_ground_m: roundM(r.heightAboveGroundM),
        speed_m_s: roundM(r.speedMps),
      },
    });
  }
  for (const [kind, f] of Object.entries(input.flags ?? {})) {
    if (!f.geometry.coordinates.length) continue;
    const info = ASSESSMENT_FLAG_KINDS.find((k) => k.key === kind);
    features.push({
      type: "Feature",
      geometry: rfc7946Polygon(f.geometry),
      properties: { layer: "flag", kind, bit: f.properties.bit, area_m2: roundM(f.properties.areaM2), label: info?.label ?? kind, explanation: info?.explanation ?? "" },
    });
  }
  for (const z of input.keepOut ?? []) {
    const drawn = wgs84Polygons(z.polygons, input.toWgs84);
    features.push({ type: "Feature", geometry: rfc7946Polygon({ type: "MultiPolygon", coordinates: drawn }), properties: { layer: "keepOut", name: z.name, buffer_m: z.bufferM } });
    if (z.bufferM > 0) {
      const grown = wgs84Polygons(z.buffered, input.toWgs84);
      features.push({ type: "Feature", geometry: rfc7946Polygon({ type: "MultiPolygon", coordinates: grown }), properties: { layer: "keepOutBuffer", name: z.name, buffer_m: z.bufferM } });
    }
  }
  const t = input.takeoff;
  // groundAmslM is already above sea level: add N for the ellipsoid.
  const ell = t.groundAmslM + input.heights.undulationM(t.lon, t.lat);
  features.push({
    type: "Feature",
    geometry: { type: "Point", coordinates: [roundDeg(t.lon), roundDeg(t.lat), roundM(ell)] },
    properties: { layer: "takeoff", ground_amsl_m: roundM(t.groundAmslM), altitude_reference: ALTITUDE_NOTE },
  });
  return { type: "FeatureCollection", features };
}

/** Right-hand winding and rounded coordinates for a (multi)polygon. */
function rfc7946Polygon(g: Polygon | MultiPolygon): Geometry {
  const wound = rewind(structuredClone(g), { reverse: false }) as Polygon | MultiPolygon;
  const ring = (r: Position[]) => r.map((p) => p.map((v, i) => (i < 2 ? roundDeg(v) : roundM(v))));
  return wound.type === "Polygon"
    ? { type: "Polygon", coordinates: wound.coordinates.map(ring) }
    : { type: "MultiPolygon", coordinates: wound.coordinates.map((poly) => poly.map(ring)) };
}
