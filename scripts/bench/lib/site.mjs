// Benchmark sites: squares on the benchmark DEM, written as WGS84 GeoJSON, and the plan
// file that flies them with a generic camera (20 MP, 1-inch sensor, 8.8 mm lens).
import { mkdirSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import proj4 from "proj4";

// The benchmark DEMs are in WGS 84 / UTM zone 33N (they keep the GDAL fixture's CRS).
const UTM33N = "+proj=utm +zone=33 +datum=WGS84 +units=m +no_defs";

/**
 * A square (or turned rectangle) site of `areaKm2` centred on (cx, cy) in UTM 33N metres,
 * as a GeoJSON FeatureCollection in WGS84 (edges densified every 100 m so it stays straight).
 * @example squareSite(1, 502000, 5202000).features[0].geometry.type // "Polygon"
 */
export function squareSite(areaKm2, cx, cy, name = `bench ${areaKm2} km2`, { aspect = 1, rotateDeg = 0 } = {}) {
  // A rectangle aspect times as long (east-west before turning) as it is wide, turned
  // rotateDeg anticlockwise about its centre: a square by default.
  const halfW = (Math.sqrt(areaKm2 * aspect) * 1000) / 2;
  const halfH = (Math.sqrt(areaKm2 / aspect) * 1000) / 2;
  const t = (rotateDeg * Math.PI) / 180;
  const turn = ([x, y]) => [cx + x * Math.cos(t) - y * Math.sin(t), cy + x * Math.sin(t) + y * Math.cos(t)];
  const corners = [[-halfW, -halfH], [halfW, -halfH], [halfW, halfH], [-halfW, halfH]].map(turn);
  const ring = [];
  for (let i = 0; i < 4; i++) {
    const [ax, ay] = corners[i];
    const [bx, by] = corners[(i + 1) % 4];
    const n = Math.max(1, Math.ceil(Math.hypot(bx - ax, by - ay) / 100));
    for (let k = 0; k < n; k++) ring.push(proj4(UTM33N, "WGS84", [ax + ((bx - ax) * k) / n, ay + ((by - ay) * k) / n]));
  }
  ring.push(ring[0]);
  return { type: "FeatureCollection", features: [{ type: "Feature", properties: { name }, geometry: { type: "Polygon", coordinates: [ring] } }] };
}

/**
 * The plan file content for a benchmark site: the demo's generic camera at 2.5 cm/px
 * +/-10 %, 75/65 % overlap, 120 m ceiling above the ground below, 30 m clearance.
 * @example benchPlanFile("/tmp/dem.tif", "/tmp/site.geojson").target.gsdCm // 2.5
 */
export function benchPlanFile(dem, area, overrides = {}) {
  return {
    name: "benchmark site",
    dem,
    area,
    camera: { sensorWidthMm: 13.2, sensorHeightMm: 8.8, focalLengthMm: 8.8, imageWidthPx: 5472, imageHeightPx: 3648, exposureS: 0.001, minIntervalS: 2 },
    target: { gsdCm: 2.5, tolerancePct: 10, ...(overrides.target ?? {}) },
    overlap: { frontPct: 75, sidePct: 65 },
    ceiling: { heightM: 120, reference: "ground" },
    clearance: { minM: 30, safetyRadiusM: 15, obstacleMarginM: 0 },
    aircraft: { type: "multirotor", speedMps: 10, minSpeedMps: 2, maxClimbMps: 3, maxDescentMps: 2, enduranceMin: 25, maxWaypoints: 99 },
    headingDeg: "auto",
    minImages: 3,
  };
}

/**
 * Writes the site and plan file of one benchmark case into `dir`; returns the plan file path.
 * @example writeCase("/tmp/case1", { dem, areaKm2: 4, cx: 502000, cy: 5202000 })
 */
export function writeCase(dir, { dem, areaKm2, cx, cy, overrides, aspect, rotateDeg }) {
  mkdirSync(dir, { recursive: true });
  const area = join(dir, "site.geojson");
  writeFileSync(area, JSON.stringify(squareSite(areaKm2, cx, cy, undefined, { aspect, rotateDeg })) + "\n");
  const plan = join(dir, "plan.json");
  writeFileSync(plan, JSON.stringify(benchPlanFile(dem, area, overrides), null, 2) + "\n");
  return plan;
}
