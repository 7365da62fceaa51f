/**
 * SVG layers of the report maps. Map units: nominal pixels, `k` per local-frame metre,
 * x to the right = east, y down = south (grid north up). Every layer is a string of SVG
 * elements; render.ts stacks them.
 */
import type { MultiPolygon, Polygon } from "geojson";
import type { GeoTransform } from "../dem/grid.js";
import type { XY } from "../layout/types.js";
import type { ProfiledLeg, ReportBlock, ReportGrid, ReportLeg } from "./model.js";
import { TAKEOFF_FROM_WORDS } from "./blocks.js";
import { contourInterval, contourLines, heightRange, type Polyline } from "./contours.js";
import { tableColour, viridisTable256 } from "./colour.js";
import { esc } from "./escape.js";
import { fmt } from "./format.js";
import { niceFloor } from "./nice.js";

export interface MapView {
  /** Width and height in SVG units. */
  w: number;
  h: number;
  xMin: number;
  yMax: number;
  /** SVG units per metre. */
  k: number;
}

/**
 * The view that shows the whole DEM window `widthPx` units across.
 *
 * @example const v = mapView(dem); // v.w === 1000
 */
export function mapView(dem: ReportGrid, widthPx = 1000): MapView {
  const t = dem.transform;
  const wM = dem.width * Math.abs(t.dx);
  const hM = dem.height * Math.abs(t.dy);
  const k = widthPx / wM;
  return { w: widthPx, h: Math.round(hM * k), xMin: Math.min(t.x0, t.x0 + dem.width * t.dx), yMax: Math.max(t.y0, t.y0 + dem.height * t.dy), k };
}

const r1 = (v: number) => Math.round(v * 10) / 10;
export const vx = (v: MapView, x: number) => r1((x - v.xMin) * v.k);
export const vy = (v: MapView, y: number) => r1((v.yMax - y) * v.k);

/** Path data for flat [c, r, ...] grid-space polylines on grid `t`. */
function gridPath(v: MapView, t: GeoTransform, lines: Polyline[], close: boolean): string {
  // Pieces joined once (join writes a number as String does): far less garbage than
  // growing the string point by point.
  const parts: (string | number)[] = [];
  for (const l of lines) {
    for (let i = 0; i < l.length; i += 2) parts.push(i ? "L" : "M", vx(v, t.x0 + l[i] * t.dx), ",", vy(v, t.y0 + l[i + 1] * t.dy));
    if (close) parts.push("Z");
  }
  return parts.join("");
}

/** A raster on grid `t` as an <image>. */
export function rasterImage(v: MapView, t: GeoTransform, w: number, h: number, uri: string, cls: string): string {
  const x = vx(v, Math.min(t.x0, t.x0 + w * t.dx));
  const y = vy(v, Math.max(t.y0, t.y0 + h * t.dy));
  const ww = r1(w * Math.abs(t.dx) * v.k);
  const hh = r1(h * Math.abs(t.dy) * v.k);
  return `<image class="${cls}" href="${uri}" x="${x}" y="${y}" width="${ww}" height="${hh}" preserveAspectRatio="none"/>`;
}

/** Mask outline rings (contours.ts maskOutline) as one evenodd path. */
export function outlinePath(v: MapView, t: GeoTransform, rings: Polyline[], attrs: string): string {
  if (!rings.length) return "";
  return `<path d="${gridPath(v, t, rings, true)}" fill-rule="evenodd" ${attrs}/>`;
}

/**
 * Contour lines with labelled heights. Every fifth line (the index contour, common
 * cartographic practice) is drawn heavier and carries the labels. The labels come as a
 * separate layer so they can sit above the flight lines.
 */
export function contourLayer(v: MapView, dem: ReportGrid): { svg: string; labels: string; intervalM: number } {
  const range = heightRange(dem.heights);
  const [lo, hi] = range;
  if (!(hi > lo)) return { svg: "", labels: "", intervalM: 0 };
  const intervalM = contourInterval(lo, hi);
  const levels = contourLines(dem, intervalM, range);
  const indexStep = intervalM * 5;
  const isIndexLevel = (z: number) => Math.abs(z / indexStep - Math.round(z / indexStep)) < 1e-6;
  // Label the index contours; where there are fewer than three of them, every line, so
  // a map of gentle ground still reads its heights.
  const labelAll = levels.filter((lv) => isIndexLevel(lv.valueM)).length < 3;
  let minor = "";
  let major = "";
  let labels = "";
  const placed: [number, number][] = [];
  const MIN_GAP = 70; // SVG units between labels: keeps them from piling up where lines bunch on steep ground
  const SPACING = 450; // SVG units of line between labels on one line
  const t = dem.transform;
  for (const lv of levels) {
    const isIndex = isIndexLevel(lv.valueM);
    const d = gridPath(v, t, lv.lines, false);
    if (isIndex) major += `<path d="${d}"/>`;
    else minor += `<path d="${d}"/>`;
    if (!(labelAll || isIndex)) continue;
    for (const l of lv.lines) {
      const n = l.length / 2;
      if (n < 4 || placed.length >= 150) continue;
      // Cumulative length along the line, in SVG units.
      const px = new Float64Array(n);
      const py = new Float64Array(n);
      const cum = new Float64Array(n);
      for (let i = 0; i < n; i++) {
        px[i] = (t.x0 + l[2 * i] * t.dx - v.xMin) * v.k;
        py[i] = (v.yMax - (t.y0 + l[2 * i + 1] * t.dy)) * v.k;
        if (i) cum[i] = cum[i - 1] + Math.hypot(px[i] - px[i - 1], py[i] - py[i - 1]);
      }
      const L = cum[n - 1];
      if (L < 90) continue;
      const at = L < 2 * SPACING ? [L / 2] : Array.from({ length: Math.floor(L / SPACING) }, (_, j) => (j + 0.5) * (L / Math.floor(L / SPACING)));
      let i = 1;
      for (const target of at) {
        while (i < n - 1 && cum[i] < target) i++;
        const f = cum[i] > cum[i - 1] ? (target - cum[i - 1]) / (cum[i] - cum[i - 1]) : 0;
        const x = px[i - 1] + f * (px[i] - px[i - 1]);
        const y = py[i - 1] + f * (py[i] - py[i - 1]);
        if (x < 20 || y < 12 || x > v.w - 20 || y > v.h - 12) continue;
        if (placed.some(([ax, ay]) => Math.hypot(ax - x, ay - y) < MIN_GAP)) continue;
        placed.push([x, y]);
        let ang = (Math.atan2(py[i] - py[i - 1], px[i] - px[i - 1]) * 180) / Math.PI;
        if (ang > 90) ang -= 180;
        if (ang < -90) ang += 180;
        labels += `<text x="${r1(x)}" y="${r1(y)}" transform="rotate(${r1(ang)} ${r1(x)} ${r1(y)})">${fmt(lv.valueM)}</text>`;
      }
    }
  }
  const svg =
    `<g class="contours" fill="none" stroke="#5b4636" stroke-linejoin="round">` +
    `<g stroke-width="0.6" stroke-opacity="0.55">${minor}</g>` +
    `<g stroke-width="1.2" stroke-opacity="0.8">${major}</g></g>`;
  return { svg, labels: `<g class="contour-labels">${labels}</g>`, intervalM };
}

/** The site outline (local-frame metres). */
export function sitePath(v: MapView, site: Polygon | MultiPolygon, attrs: string): string {
  const polys = site.type === "Polygon" ? [site.coordinates] : site.coordinates;
  let d = "";
  for (const poly of polys)
    for (const ring of poly) {
      ring.forEach((p, i) => (d += (i ? "L" : "M") + vx(v, p[0]) + "," + vy(v, p[1])));
      d += "Z";
    }
  return `<path class="site" d="${d}" fill-rule="evenodd" ${attrs}/>`;
}

/** Range of height above ground over all strip stations (for the leg colour scale). */
export function aglRange(legs: readonly ProfiledLeg[]): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (const leg of legs) {
    if (leg.kind !== "strip") continue;
    const p = leg.profile;
    for (let i = 0; i < p.s.length; i++) {
      const a = p.altitudeM[i] - p.groundM[i];
      if (a < lo) lo = a;
      if (a > hi) hi = a;
    }
  }
  if (!(hi >= lo)) return [0, 1];
  if (hi === lo) return [lo - 1, hi + 1];
  return [lo, hi];
}

/** Classes of height above ground the legs are coloured by (viridis). */
const AGL_CLASSES = 12;

/**
 * Each leg's runs of stations of one class of height above ground (AGL_CLASSES over `agl`),
 * as legsLayer draws them: per run the first station's x and y, the last's, and the class;
 * none for a transit. Made from the stations once (report/serialize.ts compactReportInput),
 * so report-data.json holds these instead of every station.
 * @example legRuns(input.legs, aglRange(input.legs))[0] // Float64Array [x0, y0, x1, y1, class, ...]
 */
export function legRuns(legs: readonly ProfiledLeg[], agl: [number, number]): Float64Array[] {
  const cls = (a: number) => Math.max(0, Math.min(AGL_CLASSES - 1, Math.floor(((a - agl[0]) / (agl[1] - agl[0])) * AGL_CLASSES)));
  return legs.map((leg) => {
    if (leg.kind === "transit") return new Float64Array(0);
    const p = leg.profile;
    const n = p.s.length;
    const out: number[] = [];
    let start = 0;
    while (start < n - 1) {
      const c = cls(p.altitudeM[start] - p.groundM[start]);
      let end = start + 1;
      while (end < n - 1 && cls(p.altitudeM[end] - p.groundM[end]) === c) end++;
      // Straight legs: the run's two ends are enough.
      out.push(p.x[start], p.y[start], p.x[end], p.y[end], c);
      start = end;
    }
    return Float64Array.from(out);
  });
}

/**
 * Legs: strips as runs of stations coloured by height above ground (legRuns: 12 viridis
 * classes, so a run of one class is one path), transits dashed, waypoints as dots.
 */
export function legsLayer(v: MapView, legs: ReportLeg[], legRunsOf: readonly Float64Array[]): string {
  const table = viridisTable256();
  const classes = AGL_CLASSES;
  const runs: string[][] = Array.from({ length: classes }, () => []);
  let transit = "";
  let bridge = "";
  let casing = "";
  let dots = "";
  // Transits through their waypoints: a leg routed around unknown ground or a keep-out zone
  // is not straight (the solver makes every corner of its way a waypoint).
  const through = (leg: ReportLeg) => {
    const pts = leg.waypoints.length >= 2 ? leg.waypoints.map((w) => [w.x, w.y]) : [leg.from, leg.to];
    return pts.map(([x, y], i) => `${i ? "L" : "M"}${vx(v, x)},${vy(v, y)}`).join("");
  };
  for (let li = 0; li < legs.length; li++) {
    const leg = legs[li];
    if (leg.kind === "transit" && leg.conflictGap) {
      bridge += through(leg);
      continue;
    }
    if (leg.kind === "transit") {
      transit += through(leg);
      continue;
    }
    casing += `M${vx(v, leg.from[0])},${vy(v, leg.from[1])}L${vx(v, leg.to[0])},${vy(v, leg.to[1])}`;
    const r = legRunsOf[li];
    for (let k = 0; k < r.length; k += 5) {
      const c = r[k + 4];
      runs[Number.isFinite(c) ? c : 0].push(`M${vx(v, r[k])},${vy(v, r[k + 1])}L${vx(v, r[k + 2])},${vy(v, r[k + 3])}`);
    }
    for (const w of leg.waypoints) dots += `<circle cx="${vx(v, w.x)}" cy="${vy(v, w.y)}" r="2.6"/>`;
  }
  let coloured = "";
  runs.forEach((ds, c) => {
    if (ds.length) coloured += `<path stroke="${tableColour(table, (c + 0.5) / classes)}" d="${ds.join("")}"/>`;
  });
  return (
    `<g class="legs" fill="none" stroke-linecap="round">` +
    `<path class="transit" d="${transit}" stroke="#222" stroke-width="1.4" stroke-dasharray="5 4" stroke-opacity="0.8"/>` +
    `<path d="${casing}" stroke="#fff" stroke-width="5.5" stroke-opacity="0.85"/>` +
    `<g stroke-width="3.2">${coloured}</g>` +
    (bridge ? `<path class="bridge" d="${bridge}" stroke="#d62728" stroke-width="4"/>` : "") +
    `</g>` +
    `<g class="waypoints" fill="#fff" stroke="#111" stroke-width="1">${dots}</g>`
  );
}

/** Take-off marker colour, and the range circle's (the range belongs to the take-off point). */
export const TAKEOFF_COLOUR = "#d62728";
/** Block outline colour: the report's accent blue, no flag kind, zone or leg uses it. */
export const BLOCK_COLOUR = "#1f5f8b";
/** The range circle's dash: longer than the transits' (5 4) and the zone buffers' (6 4), so the three read apart. */
export const RANGE_DASH = "12 6";

/**
 * A take-off triangle's path data about (x, y) in map units: apex 9 units above, base 6 below.
 *
 * @example takeoffTriangle(100, 50) // "M100,41L108,56L92,56Z"
 */
export function takeoffTriangle(x: number, y: number): string {
  return `M${x},${r1(y - 9)}L${r1(x + 8)},${r1(y + 6)}L${r1(x - 8)},${r1(y + 6)}Z`;
}

/**
 * Take-off marker: a triangle with a label. A proposed point (one the pilot must still
 * confirm) is drawn hollow; `title` becomes its tooltip.
 *
 * @example takeoffMarker(v, [500640, 4600110]) // the single take-off point, labelled "Take-off"
 */
export function takeoffMarker(v: MapView, xy: XY, o: { label?: string; title?: string; proposed?: boolean; attrs?: string } = {}): string {
  const x = vx(v, xy[0]);
  const y = vy(v, xy[1]);
  const fill = o.proposed ? `fill="#fff" stroke="${TAKEOFF_COLOUR}" stroke-width="2.2"` : `fill="${TAKEOFF_COLOUR}" stroke="#fff" stroke-width="1.5"`;
  return (
    `<g class="takeoff"${o.attrs ? " " + o.attrs : ""}>${o.title ? `<title>${esc(o.title)}</title>` : ""}<path d="${takeoffTriangle(x, y)}" ${fill}/>` +
    `<text x="${r1(x + 11)}" y="${r1(y + 4)}" class="halo">${esc(o.label ?? "Take-off")}</text></g>`
  );
}

/**
 * The tooltip of a block's take-off point: how it was chosen, its ground and reach.
 *
 * @example takeoffTitle(block) // "Take-off point of block 2, proposed: the pilot must confirm access (ground slope 4.7°). Ground 324.7 m AMSL; farthest strip point 381 m."
 */
export function takeoffTitle(b: ReportBlock): string {
  const slope = b.slopeDeg !== undefined ? ` (ground slope ${fmt(b.slopeDeg, 1)}°)` : "";
  return `Take-off point of block ${b.index}, ${TAKEOFF_FROM_WORDS[b.takeoffFrom]}${slope}. Ground ${fmt(b.takeoff.groundAmslM, 1)} m AMSL; farthest strip point ${fmt(b.farthestM, 0)} m.`;
}

/**
 * One take-off marker per block, labelled with the block's number ("Take-off 2"), hollow
 * where the point was proposed, with a tooltip saying how it was chosen.
 *
 * @example blockTakeoffMarkers(v, input.blocks) // '<g class="takeoff" data-block="1" ...>...</g>...'
 */
export function blockTakeoffMarkers(v: MapView, blocks: readonly ReportBlock[]): string {
  return blocks
    .map((b) =>
      takeoffMarker(v, [b.takeoff.x, b.takeoff.y], {
        label: `Take-off ${b.index}`,
        title: takeoffTitle(b),
        proposed: b.takeoffFrom === "proposed",
        attrs: `data-block="${b.index}" data-takeoff-from="${esc(b.takeoffFrom)}"`,
      }),
    )
    .join("");
}

/**
 * Range circles: a dashed circle of radius `rangeM` (in map units, `rangeM * k`) about each
 * take-off point. Empty when there is no limit (`rangeM` 0).
 *
 * @example rangeCircles(v, [{ block: 1, xy: [500345, 5200329] }], 500) // '<g class="ranges"><circle class="range" ... r="..."/></g>'
 */
export function rangeCircles(v: MapView, centres: readonly { block?: number; xy: XY }[], rangeM: number): string {
  if (!(rangeM > 0) || !centres.length) return "";
  const r = r1(rangeM * v.k);
  let s = "";
  for (const c of centres)
    s +=
      `<circle class="range"${c.block !== undefined ? ` data-block="${c.block}"` : ""} data-range-m="${rangeM}" cx="${vx(v, c.xy[0])}" cy="${vy(v, c.xy[1])}" r="${r}" ` +
      `fill="none" stroke="${TAKEOFF_COLOUR}" stroke-width="1.6" stroke-opacity="0.85" stroke-dasharray="${RANGE_DASH}"/>`;
  return `<g class="ranges">${s}</g>`;
}

/**
 * Block extents: each block's outline (local-frame polygons, outer ring then holes), light,
 * with its number as a tooltip.
 *
 * @example blockOutlines(v, [{ block: 1, polygons: [[[[0, 0], [100, 0], [100, 50]]]] }])
 */
export function blockOutlines(v: MapView, extents: readonly { block: number; polygons: XY[][][] }[]): string {
  let s = "";
  for (const e of extents) {
    const d = ringsPath(v, e.polygons);
    if (!d) continue;
    s +=
      `<path class="block-extent" data-block="${e.block}" d="${d}" fill-rule="evenodd" fill="${BLOCK_COLOUR}" fill-opacity="0.05" stroke="${BLOCK_COLOUR}" stroke-width="2" stroke-opacity="0.6" stroke-linejoin="round">` +
      `<title>Block ${e.block}</title></path>`;
  }
  return s ? `<g class="blocks">${s}</g>` : "";
}

/** A scale bar of a nice length (1, 2 or 5 x 10^k m) about a fifth of the map wide. */
export function scaleBar(v: MapView): string {
  const lenM = niceFloor(v.w / v.k / 5);
  const len = r1(lenM * v.k);
  const x = 16;
  const y = v.h - 18;
  const label = lenM >= 1000 ? `${fmt(lenM / 1000)} km` : `${fmt(lenM)} m`;
  const half = r1(len / 2);
  // Room for the end label, centred on the bar's end (about 7 units a character at 13 px).
  const labelHalf = Math.ceil(label.length * 3.8);
  return (
    `<g class="scalebar" data-length-m="${lenM}">` +
    `<rect x="${x - 8}" y="${y - 22}" width="${r1(len + 16 + labelHalf)}" height="32" fill="#fff" fill-opacity="0.8" rx="3"/>` +
    `<rect x="${x}" y="${y}" width="${half}" height="5" fill="#111"/>` +
    `<rect x="${r1(x + half)}" y="${y}" width="${r1(len - half)}" height="5" fill="#fff" stroke="#111" stroke-width="1"/>` +
    `<text x="${x}" y="${y - 5}">0</text><text x="${r1(x + len)}" y="${y - 5}" text-anchor="middle">${label}</text></g>`
  );
}

/**
 * North arrow. With the grid convergence known the arrow points to true north (turned by
 * the convergence from the map's grid-north up) and the note gives grid north against it;
 * without it the arrow is grid north.
 */
export function northArrow(v: MapView, convergenceDeg?: number): string {
  const x = v.w - 52;
  const y = 16;
  let note = "grid north";
  let turn = 0;
  if (convergenceDeg !== undefined && Number.isFinite(convergenceDeg)) {
    const a = Math.abs(convergenceDeg);
    turn = convergenceDeg;
    // Grid north lies on the other side of true north from where true north lies of grid north.
    note = a < 0.005 ? "true = grid north" : `grid N ${fmt(a, a < 1 ? 2 : 1)}° ${convergenceDeg > 0 ? "W" : "E"}`;
  }
  return (
    `<g class="north" data-convergence-deg="${r1(turn * 1000) / 1000}"><rect x="${x - 46}" y="${y - 6}" width="92" height="64" fill="#fff" fill-opacity="0.8" rx="3"/>` +
    `<path d="M${x},${y}L${x + 9},${y + 30}L${x},${y + 24}L${x - 9},${y + 30}Z" fill="#111" transform="rotate(${r1(turn * 100) / 100} ${x} ${y + 18})"/>` +
    `<text x="${x}" y="${y + 44}" text-anchor="middle" font-weight="700">N</text>` +
    `<text x="${x}" y="${y + 55}" text-anchor="middle" class="small">${esc(note)}</text></g>`
  );
}

/** An <svg> wrapper with the view's size. */
export function mapSvg(v: MapView, id: string, label: string, body: string, defs = ""): string {
  return (
    `<svg class="map" id="${esc(id)}" viewBox="0 0 ${v.w} ${v.h}" role="img" aria-label="${esc(label)}" xmlns="http://www.w3.org/2000/svg">` +
    (defs ? `<defs>${defs}</defs>` : "") +
    `<rect width="${v.w}" height="${v.h}" fill="#f4f4f2"/>${body}</svg>`
  );
}

/** A diagonal hatch pattern (for out-of-band and flagged cells). */
export function hatchPattern(id: string, colour: string, angleDeg: number, gap = 7): string {
  return `<pattern id="${esc(id)}" patternUnits="userSpaceOnUse" width="${gap}" height="${gap}" patternTransform="rotate(${angleDeg})"><line x1="0" y1="0" x2="0" y2="${gap}" stroke="${colour}" stroke-width="1.6"/></pattern>`;
}

/** Keep-out zone colour on every map: a magenta no flag kind, site or leg uses. */
export const KEEP_OUT_COLOUR = "#c51b7d";
/** Its hatch angle: steeper than the out-of-band (45°) and few-images (−45°) hatches and every flag kind's. */
export const KEEP_OUT_HATCH_ANGLE = -75;

/**
 * Polygons of local-frame rings as path data; a closing repeat of the first vertex is dropped (Z closes).
 *
 * @example ringsPath(v, [[[[0, 0], [10, 0], [10, 10]]]]) // "M..,..L..,..L..,..Z"
 */
export function ringsPath(v: MapView, polygons: XY[][][]): string {
  let d = "";
  for (const poly of polygons)
    for (const ring of poly) {
      let n = ring.length;
      if (n > 1 && ring[0][0] === ring[n - 1][0] && ring[0][1] === ring[n - 1][1]) n--;
      if (n < 2) continue;
      for (let i = 0; i < n; i++) d += (i ? "L" : "M") + vx(v, ring[i][0]) + "," + vy(v, ring[i][1]);
      d += "Z";
    }
  return d;
}

/**
 * Keep-out zones: each zone hatched with a solid outline, its buffer (what no leg enters)
 * tinted and outlined dashed. Holes stay open (evenodd). `hatchId` names a pattern made by
 * keepOutHatch in the same map's defs. Empty when there are no zones.
 *
 * @example mapSvg(v, "m", "map", keepOutLayer(v, zones, "hatch-keep-out"), keepOutHatch("hatch-keep-out"))
 */
export function keepOutLayer(v: MapView, zones: { bufferM: number; polygons: XY[][][]; buffered: XY[][][] }[], hatchId: string): string {
  if (!zones.length) return "";
  let s = "";
  zones.forEach((z, i) => {
    const buffer =
      z.bufferM > 0
        ? `<path class="zone-buffer" d="${ringsPath(v, z.buffered)}" fill-rule="evenodd" fill="${KEEP_OUT_COLOUR}" fill-opacity="0.1" stroke="${KEEP_OUT_COLOUR}" stroke-width="1.3" stroke-dasharray="6 4"/>`
        : "";
    const area = `<path class="zone-area" d="${ringsPath(v, z.polygons)}" fill-rule="evenodd" fill="url(#${esc(hatchId)})" stroke="${KEEP_OUT_COLOUR}" stroke-width="1.6"/>`;
    s += `<g class="keep-out-zone" data-zone="${i}">${buffer}${area}</g>`;
  });
  return `<g class="keep-out">${s}</g>`;
}

/**
 * The keep-out hatch pattern for a map's defs.
 *
 * @example mapSvg(v, "m", "map", body, keepOutHatch("hatch-keep-out-m"))
 */
export function keepOutHatch(id: string, gap = 7): string {
  return hatchPattern(id, KEEP_OUT_COLOUR, KEEP_OUT_HATCH_ANGLE, gap);
}
