/**
 * plan.kml, OGC KML 2.2 (OGC 07-147r2). Legs and waypoints use altitudeMode
 * absolute, which KML defines as metres above sea level; KML's vertical
 * reference is the EGM96 geoid (from memory: the spec's coordinate system
 * "LonLat84_5773", EPSG:5773 = EGM96 height). Flag and site polygons are
 * clamped to the ground. All text is XML-escaped.
 */
import { ASSESSMENT_FLAG_KINDS } from "../assess/flags.js";
import type { Position } from "geojson";
import { legLines, wgs84Polygons, type PlanExportInput } from "./layers.js";
import { escapeXml as x } from "./xml.js";

const ALTITUDE_NOTE =
  "Altitudes are absolute: metres above mean sea level (KML altitudeMode absolute). " +
  "They are the plan's AMSL heights, from the DEM's vertical datum. Check them on site before flight.";

/**
 * Builds the KML document text.
 *
 * @example planKml(input).startsWith('<?xml version="1.0" encoding="UTF-8"?>') // true
 */
export function planKml(input: PlanExportInput): string {
  const o: string[] = [];
  o.push('<?xml version="1.0" encoding="UTF-8"?>');
  o.push('<kml xmlns="http://www.opengis.net/kml/2.2">');
  o.push("<Document>");
  o.push(`<name>${x(input.name)}</name>`);
  o.push(`<description>${x(ALTITUDE_NOTE)}</description>`);

  o.push("<Folder><name>Site</name>");
  o.push(`<Placemark><name>${x(input.site.name)}</name>${multiPolygonKml(toPolys(input.site.wgs84))}</Placemark>`);
  o.push("</Folder>");

  const lines = legLines(input);
  const flights = [...new Set(lines.map((l) => l.flight))];
  for (const f of flights) {
    o.push(`<Folder><name>Flight ${f}</name>`);
    o.push("<Folder><name>Legs</name>");
    for (const l of lines.filter((q) => q.flight === f)) {
      const coords = l.coords.map(([lon, lat, amsl]) => coord(lon, lat, amsl)).join(" ");
      o.push(
        `<Placemark><name>${x(`Flight ${f} strip ${l.strip} ${l.segment}`)}</name>` +
          `<description>${x(`${l.segment} leg, ${l.lengthM.toFixed(1)} m at ${l.speedMps.toFixed(2)} m/s ground speed. ${ALTITUDE_NOTE}`)}</description>` +
          `<LineString><altitudeMode>absolute</altitudeMode><coordinates>${coords}</coordinates></LineString></Placemark>`,
      );
    }
    o.push("</Folder>");
    o.push("<Folder><name>Waypoints</name>");
    for (const r of input.rows.filter((q) => q.flight === f)) {
      const desc =
        `${r.segment}; AMSL ${r.altitudeAmslM.toFixed(2)} m, ellipsoid ${r.altitudeEllipsoidM.toFixed(2)} m, ` +
        `above take-off ${r.altitudeTakeoffM.toFixed(2)} m, above ground ${r.heightAboveGroundM.toFixed(2)} m, ` +
        `ground ${r.groundAmslM.toFixed(2)} m AMSL, speed ${r.speedMps.toFixed(2)} m/s`;
      o.push(
        `<Placemark><name>${x(`F${r.flight} S${r.strip} #${r.index}`)}</name><description>${x(desc)}</description>` +
          `<Point><altitudeMode>absolute</altitudeMode><coordinates>${coord(r.longitude, r.latitude, r.altitudeAmslM)}</coordinates></Point></Placemark>`,
      );
    }
    o.push("</Folder></Folder>");
  }

  const flags = Object.entries(input.flags ?? {}).filter(([, f]) => f.geometry.coordinates.length);
  if (flags.length) {
    o.push("<Folder><name>Flags</name>");
    for (const [kind, f] of flags) {
      const info = ASSESSMENT_FLAG_KINDS.find((k) => k.key === kind);
      o.push(
        `<Placemark><name>${x(info?.label ?? kind)}</name><description>${x(`${info?.explanation ?? kind} (${f.properties.areaM2.toFixed(0)} m²)`)}</description>` +
          `${multiPolygonKml(f.geometry.coordinates)}</Placemark>`,
      );
    }
    o.push("</Folder>");
  }

  if (input.keepOut?.length) {
    o.push("<Folder><name>Keep-out zones</name>");
    for (const z of input.keepOut) {
      o.push(`<Placemark><name>${x(z.name)}</name><description>${x("Keep-out zone: no leg enters it.")}</description>${multiPolygonKml(wgs84Polygons(z.polygons, input.toWgs84))}</Placemark>`);
      if (z.bufferM > 0) {
        o.push(
          `<Placemark><name>${x(`${z.name} (buffer ${z.bufferM} m)`)}</name><description>${x(`The zone grown by ${z.bufferM} m: no leg enters it.`)}</description>` +
            `${multiPolygonKml(wgs84Polygons(z.buffered, input.toWgs84))}</Placemark>`,
        );
      }
    }
    o.push("</Folder>");
  }

  const t = input.takeoff;
  o.push(
    `<Placemark><name>Take-off</name><description>${x(`Ground ${t.groundAmslM.toFixed(2)} m AMSL`)}</description>` +
      `<Point><altitudeMode>absolute</altitudeMode><coordinates>${coord(t.lon, t.lat, t.groundAmslM)}</coordinates></Point></Placemark>`,
  );
  o.push("</Document>");
  o.push("</kml>");
  return o.join("\n") + "\n";
}

function coord(lon: number, lat: number, alt?: number): string {
  return alt === undefined ? `${lon.toFixed(8)},${lat.toFixed(8)}` : `${lon.toFixed(8)},${lat.toFixed(8)},${alt.toFixed(2)}`;
}

function toPolys(g: { type: "Polygon"; coordinates: Position[][] } | { type: "MultiPolygon"; coordinates: Position[][][] }): Position[][][] {
  return g.type === "Polygon" ? [g.coordinates] : g.coordinates;
}

function ringKml(r: Position[]): string {
  return `<LinearRing><coordinates>${r.map((p) => coord(p[0], p[1])).join(" ")}</coordinates></LinearRing>`;
}

function polygonKml(rings: Position[][]): string {
  const [outer, ...holes] = rings;
  return (
    `<Polygon><tessellate>1</tessellate><altitudeMode>clampToGround</altitudeMode><outerBoundaryIs>${ringKml(outer)}</outerBoundaryIs>` +
    holes.map((h) => `<innerBoundaryIs>${ringKml(h)}</innerBoundaryIs>`).join("") +
    "</Polygon>"
  );
}

function multiPolygonKml(polys: Position[][][]): string {
  return polys.length === 1 ? polygonKml(polys[0]) : `<MultiGeometry>${polys.map(polygonKml).join("")}</MultiGeometry>`;
}
