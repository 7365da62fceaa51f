/**
 * The overview map of index.html: every site's outline as inline SVG on one local
 * equirectangular projection, with numbered markers (a site can be far smaller than a
 * pixel when the sites lie far apart), a scale bar and north up. SVG user units are
 * metres on the projection, so the outlines keep 0.1 m and the scale bar is exact.
 */
import { lonLatCentre, normaliseLonDeg } from "../geo/longitude.js";
import { esc } from "../report/escape.js";
import type { LonLatPolygons } from "./outlines.js";

/**
 * Mean radius of the earth, metres: R1 = (2a + b) / 3 of GRS 80 (Moritz, "Geodetic
 * Reference System 1980", Bulletin Geodesique 54, 1980: 6 371 008.7714 m).
 */
export const MEAN_EARTH_RADIUS_M = 6_371_008.8;

export interface MapSite {
  /** The number drawn at the site and shown in the table. */
  number: number;
  name: string;
  failed: boolean;
  polygons: LonLatPolygons;
}

export interface OverviewMap {
  svg: string;
  /** Centre of the projection, degrees. */
  lon0: number;
  lat0: number;
  /** Metres per drawn pixel at the map's nominal size. */
  metresPerPx: number;
  scaleBarM: number;
  /** Largest east-west scale error on the map, percent (0 along the central parallel). */
  edgeScaleErrorPct: number;
}

const WIDTH_PX = 640;
const PAD_PX = 40;
const SCALE_ROOM_PX = 36;
/** Smallest extent drawn, metres: one small site still gets some ground around it. */
const MIN_EXTENT_M = 200;
const MARKER_R_PX = 8;

/**
 * Where a marker goes: its site's centre when no placed marker is within two radii,
 * else the first free point on rings of growing radius around it (12 directions each).
 */
function markerPlace(x: number, y: number, placed: readonly [number, number][], mpp: number): [number, number] {
  const clear = (px: number, py: number) => placed.every(([qx, qy]) => Math.hypot(px - qx, py - qy) >= 2.2 * MARKER_R_PX * mpp);
  if (clear(x, y)) return [x, y];
  for (let ring = 1; ring <= 6; ring++) {
    for (let k = 0; k < 12; k++) {
      // Start up and to the right, where labels read naturally.
      const a = -Math.PI / 4 + (k * Math.PI) / 6;
      const px = x + Math.cos(a) * ring * 22 * mpp, py = y + Math.sin(a) * ring * 22 * mpp;
      if (clear(px, py)) return [px, py];
    }
  }
  return [x, y];
}

/**
 * Local equirectangular projection about (lon0, lat0): x = R cos(lat0) dlon, y = R dlat
 * (radians). True to scale along lat0 and along meridians; good for an overview of
 * sites a few hundred kilometres apart, and free of Web Mercator's growth with latitude.
 * @example projectLocal(15.01, 46.96, 15, 46.96) // [~760.1, 0]
 */
export function projectLocal(lon: number, lat: number, lon0: number, lat0: number): [number, number] {
  const rad = Math.PI / 180;
  const dLon = normaliseLonDeg(lon - lon0);
  return [MEAN_EARTH_RADIUS_M * Math.cos(lat0 * rad) * dLon * rad, MEAN_EARTH_RADIUS_M * (lat - lat0) * rad];
}

/**
 * The largest 1, 2 or 5 times a power of ten not above `m` (a scale bar's length).
 * @example niceLengthM(730) // 500
 */
export function niceLengthM(m: number): number {
  const p = 10 ** Math.floor(Math.log10(m));
  return [5, 2, 1].map((k) => k * p).find((v) => v <= m) ?? p;
}

/**
 * The overview map, or null when no site has an outline to draw.
 * @example overviewMap([{ number: 1, name: "gorge", failed: false, polygons }])?.svg.startsWith("<svg") // true
 */
export function overviewMap(sites: readonly MapSite[]): OverviewMap | null {
  const lons: number[] = [];
  const lats: number[] = [];
  for (const s of sites) for (const poly of s.polygons) for (const ring of poly) for (const [lon, lat] of ring) {
    lons.push(lon);
    lats.push(lat);
  }
  if (!lons.length) return null;
  const [lon0, lat0] = lonLatCentre(lons, lats);
  const proj = (lon: number, lat: number) => projectLocal(lon, lat, lon0, lat0);

  let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
  const drawn = sites.map((s) => {
    const polys = s.polygons.map((poly) => poly.map((ring) => ring.map(([lon, lat]) => proj(lon, lat))));
    let sx0 = Infinity, sx1 = -Infinity, sy0 = Infinity, sy1 = -Infinity;
    for (const poly of polys) for (const ring of poly) for (const [x, y] of ring) {
      sx0 = Math.min(sx0, x); sx1 = Math.max(sx1, x); sy0 = Math.min(sy0, y); sy1 = Math.max(sy1, y);
    }
    if (polys.length) {
      x0 = Math.min(x0, sx0); x1 = Math.max(x1, sx1); y0 = Math.min(y0, sy0); y1 = Math.max(y1, sy1);
    }
    return { site: s, polys, centre: polys.length ? ([(sx0 + sx1) / 2, (sy0 + sy1) / 2] as const) : null };
  });
  const contentW = Math.max(x1 - x0, MIN_EXTENT_M);
  const contentH = Math.max(y1 - y0, MIN_EXTENT_M);
  const heightPx = Math.round(Math.min(520, Math.max(240, ((WIDTH_PX - 2 * PAD_PX) * contentH) / contentW + 2 * PAD_PX + SCALE_ROOM_PX)));
  const mpp = Math.max(contentW / (WIDTH_PX - 2 * PAD_PX), contentH / (heightPx - 2 * PAD_PX - SCALE_ROOM_PX));
  const cx = (x0 + x1) / 2, cy = (y0 + y1) / 2;
  // SVG's y grows downwards: north (y) is drawn as -y.
  const vbW = WIDTH_PX * mpp, vbH = heightPx * mpp;
  const vx = cx - vbW / 2;
  const vy = -cy - (vbH - SCALE_ROOM_PX * mpp) / 2;
  const f = (v: number) => (Math.round(v * 10) / 10).toFixed(1);
  const px = (n: number) => f(n * mpp);

  const parts: string[] = [];
  parts.push(`<svg class="overview" viewBox="${f(vx)} ${f(vy)} ${f(vbW)} ${f(vbH)}" width="${WIDTH_PX}" height="${heightPx}" role="img" aria-label="Overview map of the sites">`);
  parts.push(`<rect x="${f(vx)}" y="${f(vy)}" width="${f(vbW)}" height="${f(vbH)}" class="map-bg"/>`);
  for (const d of drawn) {
    if (!d.polys.length) continue;
    const path = d.polys.flatMap((poly) => poly.map((ring) => `M${ring.map(([x, y]) => `${f(x)} ${f(-y)}`).join("L")}Z`)).join("");
    parts.push(`<path d="${path}" class="${d.site.failed ? "outline failed" : "outline"}" data-site="${d.site.number}" fill-rule="evenodd" vector-effect="non-scaling-stroke"><title>${esc(d.site.name)}</title></path>`);
  }
  // Markers: a site far smaller than a pixel still shows; markers that would overlap
  // move out along a leader line to the first free place on rings around their site.
  const placed: [number, number][] = [];
  for (const d of drawn) {
    if (!d.centre) continue;
    const [sx, sy] = [d.centre[0], -d.centre[1]];
    const [mx, my] = markerPlace(sx, sy, placed, mpp);
    placed.push([mx, my]);
    const leader = mx !== sx || my !== sy ? `<line x1="${f(sx)}" y1="${f(sy)}" x2="${f(mx)}" y2="${f(my)}" class="leader" vector-effect="non-scaling-stroke"/>` : "";
    parts.push(
      `<g class="${d.site.failed ? "marker failed" : "marker"}" data-site="${d.site.number}"><title>${esc(`${d.site.number}. ${d.site.name}`)}</title>${leader}` +
        `<circle cx="${f(mx)}" cy="${f(my)}" r="${px(MARKER_R_PX)}" vector-effect="non-scaling-stroke"/>` +
        `<text x="${f(mx)}" y="${f(my + 4 * mpp)}" font-size="${px(11)}" text-anchor="middle">${d.site.number}</text></g>`,
    );
  }
  // Scale bar at the bottom left, about a quarter of the width; north arrow at the top right.
  const barM = niceLengthM((vbW - 2 * PAD_PX * mpp) / 4);
  const bx = vx + PAD_PX * mpp, by = vy + vbH - 14 * mpp;
  const label = barM >= 1000 ? `${barM / 1000} km` : `${barM} m`;
  parts.push(
    `<g id="scale-bar" data-metres="${barM}">` +
      `<line x1="${f(bx)}" y1="${f(by)}" x2="${f(bx + barM)}" y2="${f(by)}" vector-effect="non-scaling-stroke"/>` +
      `<line x1="${f(bx)}" y1="${f(by - 4 * mpp)}" x2="${f(bx)}" y2="${f(by)}" vector-effect="non-scaling-stroke"/>` +
      `<line x1="${f(bx + barM)}" y1="${f(by - 4 * mpp)}" x2="${f(bx + barM)}" y2="${f(by)}" vector-effect="non-scaling-stroke"/>` +
      `<text x="${f(bx + barM / 2)}" y="${f(by - 6 * mpp)}" font-size="${px(11)}" text-anchor="middle">${label}</text></g>`,
  );
  // North arrow at the bottom right, in the strip kept free for the scale bar.
  const nx = vx + vbW - PAD_PX * mpp, ny = by;
  parts.push(
    `<g class="north"><line x1="${f(nx)}" y1="${f(ny)}" x2="${f(nx)}" y2="${f(ny - 20 * mpp)}" vector-effect="non-scaling-stroke"/>` +
      `<path d="M${f(nx - 4 * mpp)} ${f(ny - 14 * mpp)}L${f(nx)} ${f(ny - 22 * mpp)}L${f(nx + 4 * mpp)} ${f(ny - 14 * mpp)}Z"/>` +
      `<text x="${f(nx - 12 * mpp)}" y="${f(ny - 6 * mpp)}" font-size="${px(11)}" text-anchor="middle">N</text></g>`,
  );
  parts.push(`</svg>`);

  // East-west scale is cos(lat) / cos(lat0) of true away from the central parallel.
  const rad = Math.PI / 180;
  const halfLatDeg = vbH / 2 / MEAN_EARTH_RADIUS_M / rad;
  const c0 = Math.cos(lat0 * rad);
  const edge = [lat0 - halfLatDeg, lat0 + halfLatDeg].map((l) => Math.abs(Math.cos(Math.max(-90, Math.min(90, l)) * rad) / c0 - 1));
  return { svg: parts.join(""), lon0, lat0, metresPerPx: mpp, scaleBarM: barM, edgeScaleErrorPct: 100 * Math.max(...edge) };
}
