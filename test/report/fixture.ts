/**
 * A small synthetic but self-consistent plan for the report tests: a hill and a valley on
 * a makeGrid DEM, parallel strips whose waypoint altitudes follow the ground within a
 * take-off-referenced ceiling, and per-cell GSD / image counts / flags computed from those
 * waypoints by a straightforward footprint check. The summary is computed from the same
 * rasters, so the numbers the report prints can be checked against it.
 */
import type { Polygon } from "geojson";
import { makeGrid, sampleBilinear } from "../../src/dem/sample.js";
import { FLAG_CEILING, FLAG_COARSE, FLAG_FEW_IMAGES, FLAG_FINE, FLAG_KINDS } from "../../src/assess/flags.js";
import type { BaselineStats, ReportInput, ReportLeg, ReportSummary } from "../../src/report/model.js";
import { gsdBinEdges, histogram } from "../../src/report/histogram.js";

const X0 = 500_000;
const Y0 = 4_600_600;
const CELL = 5;
const W = 160;
const H = 120;
// Generic camera: 1-inch sensor 13.2 mm, 5472 x 3648 px, 8.8 mm lens.
const IFOV = 13.2 / 5472 / 8.8;
const PX_W = 5472;
const PX_H = 3648;

function ground(x: number, y: number): number {
  const u = x - X0;
  const v = y - (Y0 - H * CELL);
  return 300 + 55 * Math.exp(-((u - 520) ** 2 + (v - 330) ** 2) / (2 * 130 ** 2)) - 25 * Math.exp(-((u - 200) ** 2 + (v - 200) ** 2) / (2 * 90 ** 2)) + 0.03 * u;
}

function inPolygon(x: number, y: number, ring: number[][]): boolean {
  let inside = false;
  for (let i = 0, j = ring.length - 1; i < ring.length; j = i++) {
    const [xi, yi] = ring[i];
    const [xj, yj] = ring[j];
    if (yi > y !== yj > y && x < ((xj - xi) * (y - yi)) / (yj - yi) + xi) inside = !inside;
  }
  return inside;
}

function percentile(sorted: Float64Array, p: number): number {
  // Nearest-rank percentile.
  const k = Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1));
  return sorted[k];
}

function statsOf(values: number[]) {
  const s = Float64Array.from(values).sort();
  return { min: s[0], p5: percentile(s, 5), median: percentile(s, 50), p95: percentile(s, 95), max: s[s.length - 1] };
}

export function makeReportInput(opts: { siteName?: string; demFile?: string } = {}): ReportInput {
  const dem = makeGrid({ width: W, height: H, x0: X0, y0: Y0, cellM: CELL, heights: ground });
  const yBottom = Y0 - H * CELL;
  const ring = [
    [X0 + 90, yBottom + 70],
    [X0 + 720, yBottom + 60],
    [X0 + 740, yBottom + 430],
    [X0 + 420, yBottom + 540],
    [X0 + 110, yBottom + 500],
    [X0 + 90, yBottom + 70],
  ];
  const site: Polygon = { type: "Polygon", coordinates: [ring] };
  const targetCm = 2.5;
  const tol = 0.1;
  const lowCm = targetCm * (1 - tol);
  const highCm = targetCm * (1 + tol);
  const hTarget = targetCm / 100 / IFOV;
  const hMin = lowCm / 100 / IFOV;
  const hMax = highCm / 100 / IFOV;
  const spacing = PX_W * (targetCm / 100) * (1 - 0.7);
  const trigger = PX_H * (targetCm / 100) * (1 - 0.75);
  const takeoff: [number, number] = [X0 + 640, yBottom + 110];
  const takeoffGround = ground(...takeoff);
  const ceilingM = 120;
  const clearanceM = 30;
  const step = CELL;
  const legs: ReportLeg[] = [];
  const stripYs: number[] = [];
  for (let y = yBottom + 60 + spacing / 2; y < yBottom + 545; y += spacing) stripYs.push(y);
  let prev: [number, number] = takeoff;
  const exposures: { x: number; y: number; z: number }[] = [];
  const stationCause: { y: number; xs: Float64Array; alt: Float64Array; ceil: Uint8Array }[] = [];
  stripYs.forEach((y, k) => {
    const forward = k % 2 === 0;
    const xa = X0 + 70, xb = X0 + 760;
    const from: [number, number] = forward ? [xa, y] : [xb, y];
    const to: [number, number] = forward ? [xb, y] : [xa, y];
    const len = Math.abs(xb - xa);
    const n = Math.floor(len / step) + 1;
    const s = new Float64Array(n), xs = new Float64Array(n), ys = new Float64Array(n).fill(y);
    for (let i = 0; i < n; i++) {
      s[i] = i * step;
      xs[i] = from[0] + (forward ? 1 : -1) * s[i];
    }
    const g = sampleBilinear(dem, xs, ys);
    const hardLow = g.map((v) => v + clearanceM);
    const hardHigh = new Float64Array(n).fill(takeoffGround + ceilingM);
    const bandLow = g.map((v) => v + hMin);
    const bandHigh = g.map((v) => v + hMax);
    const want = g.map((v, i) => Math.min(hardHigh[i], Math.max(hardLow[i], v + hTarget)));
    // Waypoints every 12 stations (60 m) and at the end.
    const idx: number[] = [];
    for (let i = 0; i < n; i += 12) idx.push(i);
    if (idx[idx.length - 1] !== n - 1) idx.push(n - 1);
    const alt = new Float64Array(n);
    for (let w = 0; w + 1 < idx.length; w++) {
      const a = idx[w], b = idx[w + 1];
      for (let i = a; i <= b; i++) alt[i] = want[a] + ((want[b] - want[a]) * (i - a)) / (b - a);
    }
    const status = new Uint8Array(n);
    const cause = new Uint8Array(n);
    const ceil = new Uint8Array(n);
    for (let i = 0; i < n; i++) {
      if (bandLow[i] > hardHigh[i]) {
        status[i] = 1;
        cause[i] = 1;
        ceil[i] = 1;
      } else if (alt[i] < bandLow[i] || alt[i] > bandHigh[i]) status[i] = 1;
    }
    const waypoints = idx.map((i) => ({ x: xs[i], y, s: s[i], altitudeAmslM: alt[i], groundAmslM: g[i], heightAboveGroundM: alt[i] - g[i] }));
    const tr: [number, number] = [...prev];
    legs.push({
      kind: "transit", strip: k + 1, from: tr, to: from, lengthM: Math.hypot(from[0] - tr[0], from[1] - tr[1]),
      waypoints: [], profile: emptyProfile(),
    });
    legs.push({
      kind: "strip", strip: k + 1, from, to, lengthM: len, waypoints,
      profile: { s, x: xs, y: ys, groundM: g, hardLowM: hardLow, hardHighM: hardHigh, bandLowM: bandLow, bandHighM: bandHigh, altitudeM: alt, status, cause },
    });
    for (let d = 0; d <= len; d += trigger) {
      const i = Math.min(n - 1, Math.round(d / step));
      exposures.push({ x: xs[i], y, z: alt[i] });
    }
    stationCause.push({ y, xs, alt, ceil });
    prev = to;
  });
  legs.push({ kind: "transit", strip: stripYs.length, from: prev, to: takeoff, lengthM: Math.hypot(prev[0] - takeoff[0], prev[1] - takeoff[1]), waypoints: [], profile: emptyProfile() });

  // Per-cell check.
  const N = W * H;
  const gsdCm = new Float32Array(N).fill(NaN);
  const images = new Uint16Array(N);
  const flags = new Uint8Array(N);
  const inSite = new Uint8Array(N);
  const minImages = 5;
  const gsdList: number[] = [];
  const imgList: number[] = [];
  const baseAlt = (() => {
    const gs: number[] = [];
    for (let r = 0; r < H; r++) for (let c = 0; c < W; c++) {
      const x = X0 + (c + 0.5) * CELL, y = Y0 - (r + 0.5) * CELL;
      if (inPolygon(x, y, ring)) gs.push(dem.heights[r * W + c]);
    }
    return statsOf(gs).median + hTarget;
  })();
  const baseList: number[] = [];
  let baseBreach = 0;
  for (let r = 0; r < H; r++)
    for (let c = 0; c < W; c++) {
      const i = r * W + c;
      const x = X0 + (c + 0.5) * CELL, y = Y0 - (r + 0.5) * CELL;
      if (!inPolygon(x, y, ring)) continue;
      inSite[i] = 1;
      const z = dem.heights[i];
      let best = Infinity, bestGsd = NaN, count = 0;
      for (const e of exposures) {
        const hag = e.z - z;
        const halfA = (hag * IFOV * PX_W) / 2, halfL = (hag * IFOV * PX_H) / 2;
        const dx = Math.abs(x - e.x), dy = Math.abs(y - e.y);
        if (dy <= halfA && dx <= halfL) {
          count++;
          const off = Math.hypot(dx, dy);
          if (off < best) {
            best = off;
            bestGsd = hag * IFOV * 100;
          }
        }
      }
      gsdCm[i] = bestGsd;
      images[i] = count;
      if (bestGsd > highCm) flags[i] |= FLAG_COARSE;
      if (bestGsd < lowCm) flags[i] |= FLAG_FINE;
      if (count < minImages) flags[i] |= FLAG_FEW_IMAGES;
      let nearest = stationCause[0];
      for (const sc of stationCause) if (Math.abs(sc.y - y) < Math.abs(nearest.y - y)) nearest = sc;
      const si = Math.max(0, Math.min(nearest.xs.length - 1, Math.round(Math.abs(x - nearest.xs[0]) / step)));
      if (nearest.ceil[si]) flags[i] |= FLAG_CEILING;
      if (Number.isFinite(bestGsd)) gsdList.push(bestGsd);
      imgList.push(count);
      baseList.push((baseAlt - z) * IFOV * 100);
      if (baseAlt - z > ceilingM) baseBreach++;
    }
  const cellArea = CELL * CELL;
  const siteCells = imgList.length;
  const byKind: Record<string, { cells: number; areaM2: number; pct: number }> = {};
  let flaggedCells = 0;
  for (let i = 0; i < N; i++) if (inSite[i] && flags[i]) flaggedCells++;
  for (const k of FLAG_KINDS) {
    let cells = 0;
    for (let i = 0; i < N; i++) if (inSite[i] && flags[i] & k.bit) cells++;
    byKind[k.key] = { cells, areaM2: cells * cellArea, pct: (100 * cells) / siteCells };
  }
  const inBand = gsdList.filter((v) => v >= lowCm && v <= highCm).length;
  const baseInBand = baseList.filter((v) => v >= lowCm && v <= highCm).length;
  const strips = stripYs.length;
  const pathLengthM = legs.reduce((a, l) => a + l.lengthM, 0);
  const summary: ReportSummary = {
    strips,
    waypoints: legs.reduce((a, l) => a + l.waypoints.length, 0),
    photos: exposures.length,
    flights: 1,
    batteries: 1,
    pathLengthM,
    flightTimeS: pathLengthM / 8,
    headingDeg: 90,
    lineSpacingM: spacing,
    triggerDistanceM: trigger,
    speedMps: 8,
    speedLimit: "trigger interval",
    gsdCm: { target: targetCm, low: lowCm, high: highCm, ...statsOf(gsdList) },
    withinBandPct: (100 * inBand) / gsdList.length,
    images: { min: statsOf(imgList).min, median: statsOf(imgList).median },
    flagged: { cells: flaggedCells, areaM2: flaggedCells * cellArea, byKind },
    ceiling: { heightM: ceilingM, reference: "takeoff" },
    verticalDatum: "egm96",
    takeoff: { lon: 15.0, lat: 41.5, groundAmslM: takeoffGround },
    warnings: ["Strip 4 is detail-limited by the ceiling over the hill top."],
    cautions: ["The DEM is bare earth; add an obstacle margin for trees."],
  };
  const baseline: BaselineStats = {
    altitudeAmslM: baseAlt,
    heightAboveMedianGroundM: hTarget,
    gsdCm: statsOf(baseList),
    withinBandPct: (100 * baseInBand) / baseList.length,
    ceilingBreaches: { cells: baseBreach, areaM2: baseBreach * cellArea },
  };
  // Both histograms on the same bins, wide enough for the baseline's spread.
  const planStats = summary.gsdCm;
  const edges = gsdBinEdges(lowCm, highCm, Math.min(planStats.min, baseline.gsdCm.min), Math.max(planStats.max, baseline.gsdCm.max), 30);
  const baseRaster = new Float32Array(N).fill(NaN);
  let bi = 0;
  for (let i = 0; i < N; i++) if (inSite[i]) baseRaster[i] = baseList[bi++];
  return {
    gsdHistogram: histogram(gsdCm, inSite, edges),
    baselineHistogram: histogram(baseRaster, inSite, edges),
    siteName: opts.siteName ?? "Demo hill farm",
    summary,
    dem,
    rasters: { width: W, height: H, transform: dem.transform, gsdCm, images, flags, inSite },
    site,
    legs,
    takeoff,
    baseline,
    planCeilingBreaches: { cells: 0, areaM2: 0 },
    files: { dem: opts.demFile ?? "hill.tif", area: "site.geojson", planFile: "plan.yaml", outputs: ["waypoints.csv", "plan.geojson"] },
    verticalReferences: {
      demDatum: "EGM96 orthometric heights",
      geoidModel: "EGM96 (15' grid)",
      altitudes: [
        { name: "altitude_amsl_m", reference: "above mean sea level (EGM96)" },
        { name: "altitude_ellipsoid_m", reference: "above the WGS84 ellipsoid (AMSL + EGM96 N)" },
        { name: "altitude_takeoff_m", reference: "above the take-off point's ground" },
      ],
    },
    assumptions: { surfaceModel: "DTM", demAccuracyM: 2, notes: ["Synthetic terrain for testing."] },
    cautions: [],
    minImages,
    crsName: "WGS 84 / UTM zone 33N",
    gridConvergenceDeg: -0.66,
    generatedAt: "2024-05-01T18:00:00Z",
    toolVersion: "0.1.0",
  };
}

function emptyProfile() {
  const f = () => new Float64Array(0);
  return { s: f(), x: f(), y: f(), groundM: f(), hardLowM: f(), hardHighM: f(), bandLowM: f(), bandHighM: f(), altitudeM: f(), status: new Uint8Array(0), cause: new Uint8Array(0) };
}
