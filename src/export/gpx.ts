/**
 * plan.gpx, GPX 1.1 (topografix.com/GPX/1/1): one <rte> per flight, one
 * <rtept> per waypoint. <ele> is metres above mean sea level, said in each
 * route's <desc>; <geoidheight> carries the geoid's height above the WGS84
 * ellipsoid there (GPX 1.1: "as defined in NMEA GGA"), so ele + geoidheight
 * is the ellipsoidal altitude. Element order follows the GPX 1.1 schema.
 */
import type { WaypointRow } from "./rows.js";
import type { PlanExportInput } from "./layers.js";
import { escapeXml as x } from "./xml.js";

const ELE_NOTE = "ele: metres above mean sea level (AMSL); geoidheight: geoid above the WGS84 ellipsoid, metres.";

/**
 * Builds the GPX document text.
 *
 * @example planGpx(input) // '<?xml version="1.0" encoding="UTF-8"?>\n<gpx version="1.1" ...'
 */
export function planGpx(input: Pick<PlanExportInput, "name" | "rows">): string {
  const o: string[] = [];
  o.push('<?xml version="1.0" encoding="UTF-8"?>');
  o.push('<gpx version="1.1" creator="gsdplan" xmlns="http://www.topografix.com/GPX/1/1">');
  o.push(`<metadata><name>${x(input.name)}</name><desc>${x(ELE_NOTE)}</desc></metadata>`);
  const byFlight = new Map<number, WaypointRow[]>();
  for (const r of input.rows) {
    if (!byFlight.has(r.flight)) byFlight.set(r.flight, []);
    byFlight.get(r.flight)!.push(r);
  }
  for (const [flight, rows] of byFlight) {
    o.push("<rte>");
    o.push(`<name>${x(`${input.name} flight ${flight}`)}</name>`);
    o.push(`<desc>${x(`Flight ${flight}, ${rows.length} waypoints. ${ELE_NOTE}`)}</desc>`);
    o.push(`<number>${flight}</number>`);
    for (const r of rows) {
      o.push(
        `<rtept lat="${r.latitude.toFixed(8)}" lon="${r.longitude.toFixed(8)}">` +
          `<ele>${r.altitudeAmslM.toFixed(2)}</ele>` +
          `<geoidheight>${(r.altitudeEllipsoidM - r.altitudeAmslM).toFixed(2)}</geoidheight>` +
          `<name>${x(`F${r.flight} S${r.strip} #${r.index}`)}</name>` +
          `<desc>${x(`${r.segment}; above take-off ${r.altitudeTakeoffM.toFixed(2)} m, above ground ${r.heightAboveGroundM.toFixed(2)} m, speed ${r.speedMps.toFixed(2)} m/s`)}</desc>` +
          `<type>${r.segment}</type>` +
          `</rtept>`,
      );
    }
    o.push("</rte>");
  }
  o.push("</gpx>");
  return o.join("\n") + "\n";
}
