/**
 * The self-contained HTML report: one file, no network (a Content-Security-Policy forbids
 * any fetch and lets only our own inline script run, by hash), system fonts, inline CSS,
 * SVG charts and PNG data-URI rasters, print rules for A4 and US Letter.
 */
import { STANDARD_CAUTIONS } from "../cautions.js";
import { createHash } from "node:crypto";
import { ASSESSMENT_FLAG_KINDS, type FlagKind } from "../assess/flags.js";
import type { ReportInput, ReportSummary } from "./model.js";
import { compactReportInput } from "./serialize.js";
import { REPORT_MAP_PX } from "./downsample.js";
import { gsdRgba, imagesRgba, pngDataUri } from "./png.js";
import { demLayers, demLayersKey, type DemLayers } from "./demLayers.js";
import { maskOutline } from "./contours.js";
import {
  blockOutlines, blockTakeoffMarkers, hatchPattern, keepOutHatch, keepOutLayer, legsLayer, mapSvg, mapView, northArrow, outlinePath,
  rangeCircles, rasterImage, scaleBar, sitePath, takeoffMarker, takeoffTitle, type MapView,
} from "./map.js";
import { blocksLegend, gsdLegend, keepOutLegend, sequentialLegend } from "./legend.js";
import { blockExtents } from "./blocks.js";
import type { XY } from "../layout/types.js";
import { profileLegend, stripProfiles } from "./profiles.js";
import { gsdHistogramSvg } from "./charts.js";
import { esc, jsonForScript } from "./escape.js";
import { fmt, fmtArea, fmtDuration, fmtMinSec } from "./format.js";
import { REPORT_CSS } from "./style.js";

/** Cautions every report carries, whatever the plan says (domain practice). */
export { STANDARD_CAUTIONS };

/** Colour and hatch angle per flag kind on the flags map (keyed by FlagKind so a new kind cannot be missed). */
const FLAG_STYLE: Record<FlagKind["key"], { colour: string; angle: number }> = {
  coarse: { colour: "#b40426", angle: 45 },
  fine: { colour: "#3b4cc0", angle: -45 },
  fewImages: { colour: "#7b3294", angle: 0 },
  ceiling: { colour: "#e66101", angle: 90 },
  clearance: { colour: "#8c510a", angle: 30 },
  nodata: { colour: "#444444", angle: -30 },
  unflyable: { colour: "#d62728", angle: 60 },
  relief: { colour: "#1b7837", angle: -60 },
  keepOut: { colour: "#01665e", angle: 15 },
};

const EFFECT_KEYS = new Set(["coarse", "fine", "fewImages", "keepOut"]);

/** A number in a cell, with its summary key and exact value for machines and tests. */
function num(key: string, v: unknown, text?: string): string {
  const exact = typeof v === "number" ? String(v) : "";
  return `<span class="num" data-key="${esc(key)}" data-value="${esc(exact)}">${esc(text ?? fmt(v))}</span>`;
}

/** Numeric leaves of the summary with their dotted keys, in document order. */
export function flattenNumbers(obj: unknown, prefix = "", out: [string, number][] = []): [string, number][] {
  if (typeof obj === "number") out.push([prefix, obj]);
  else if (obj && typeof obj === "object" && !Array.isArray(obj))
    for (const [k, v] of Object.entries(obj)) flattenNumbers(v, prefix ? `${prefix}.${k}` : k, out);
  return out;
}

/** Words for a summary key in the numbers table. */
const KEY_LABELS: Record<string, string> = {
  strips: "Strips",
  waypoints: "Waypoints",
  photos: "Photos",
  flights: "Flights",
  batteries: "Batteries",
  pathLengthM: "Path length, m",
  flightTimeS: "Flight time, s",
  headingDeg: "Strip heading, ° from grid north",
  lineSpacingM: "Strip spacing, m",
  triggerDistanceM: "Trigger distance, m",
  speedMps: "Ground speed, m/s",
  withinBandPct: "Site within the GSD band, %",
  "gsdCm.target": "GSD target, cm/px",
  "gsdCm.low": "GSD band low, cm/px",
  "gsdCm.high": "GSD band high, cm/px",
  "gsdCm.min": "GSD min, cm/px",
  "gsdCm.p5": "GSD 5th percentile, cm/px",
  "gsdCm.median": "GSD median, cm/px",
  "gsdCm.p95": "GSD 95th percentile, cm/px",
  "gsdCm.max": "GSD max, cm/px",
  "images.min": "Images per cell, min",
  "images.median": "Images per cell, median",
  "flagged.cells": "Flagged cells",
  "flagged.areaM2": "Flagged area, m²",
  "ceiling.heightM": "Ceiling, m",
  "takeoff.lon": "Take-off longitude, °",
  "takeoff.lat": "Take-off latitude, °",
  "takeoff.groundAmslM": "Take-off ground, m AMSL",
  areaM2: "Site area, m²",
  targetHeightAglM: "Height above ground for the target GSD, m",
  "flagged.pct": "Flagged share of the site, %",
  "images.required": "Images per cell, required",
  "stations.ok": "Strip stations within the band",
  "stations.detailLimited": "Strip stations detail-limited",
  "stations.unflyable": "Strip stations unflyable",
  "clearance.minM": "Clearance above ground, m",
  "clearance.safetyRadiusM": "Clearance safety radius, m",
  "clearance.obstacleMarginM": "Obstacle margin, m",
  "clearance.demAccuracyM": "Clearance added for the DEM's stated accuracy, m",
  "clearance.floorM": "Clearance floor in all, m",
  "frame.epsg": "Working frame, EPSG code",
  "constantAltitude.altitudeAmslM": "One constant altitude: altitude, m AMSL",
  "constantAltitude.gsdCm.min": "One constant altitude: GSD min, cm/px",
  "constantAltitude.gsdCm.p5": "One constant altitude: GSD 5th percentile, cm/px",
  "constantAltitude.gsdCm.median": "One constant altitude: GSD median, cm/px",
  "constantAltitude.gsdCm.p95": "One constant altitude: GSD 95th percentile, cm/px",
  "constantAltitude.gsdCm.max": "One constant altitude: GSD max, cm/px",
  "constantAltitude.withinBandPct": "One constant altitude: site within the band, %",
  "constantAltitude.flaggedAreaM2": "One constant altitude: flagged area, m²",
  "constantAltitude.ceilingBreachAreaM2": "One constant altitude: ceiling broken over, m²",
  "keepOut.stripCutM": "Strip length cut at keep-out zones, m",
  "keepOut.routedTransits": "Transits routed around obstacles",
  "keepOut.detourM": "Length added by routing around obstacles, m",
  maxRangeM: "Range from the take-off point, m (0: no limit)",
  "crossStrips.first.headingDeg": "First strip family: heading, degrees",
  "crossStrips.first.strips": "First strip family: strips",
  "crossStrips.first.photos": "First strip family: photos",
  "crossStrips.first.flights": "First strip family: flights",
  "crossStrips.first.flightTimeS": "First strip family: flight time, s",
  "crossStrips.first.imagesMedian": "First strip family alone: images per cell, median",
  "crossStrips.second.headingDeg": "Cross strips: heading, degrees",
  "crossStrips.second.strips": "Cross strips: strips",
  "crossStrips.second.photos": "Cross strips: photos",
  "crossStrips.second.flights": "Cross strips: flights",
  "crossStrips.second.flightTimeS": "Cross strips: flight time, s",
  "crossStrips.second.imagesMedian": "Cross strips alone: images per cell, median",
  "crossStrips.imagesMedianBoth": "Both strip families: images per cell, median",
};

function labelFor(key: string): string {
  if (KEY_LABELS[key]) return KEY_LABELS[key];
  const m = /^flagged\.byKind\.([^.]+)\.(cells|areaM2|pct)$/.exec(key);
  if (m) {
    const kind = ASSESSMENT_FLAG_KINDS.find((k) => k.key === m[1]);
    const what = m[2] === "cells" ? "cells" : m[2] === "areaM2" ? "area, m²" : "% of site";
    return `Flagged “${kind ? kind.label : m[1]}”, ${what}`;
  }
  return key;
}

/**
 * Decimals for the numbers table: the value's own (summary.json is already rounded, degrees
 * to 8 decimals), at most 8. The tolerance only absorbs binary rounding (about 1e-16 of the
 * value): a looser one took 15.00723519 for 15.0072352.
 */
function decimalsOf(v: number): number {
  if (!Number.isFinite(v) || Number.isInteger(v)) return 0;
  for (let d = 1; d < 8; d++) if (Math.abs(v - +v.toFixed(d)) < 1e-12 * Math.max(1, Math.abs(v))) return d;
  return 8;
}

/** The numbers table prints each summary value as summary.json holds it; codes without digit grouping. */
function tableText(key: string, v: number): string {
  if (/(^|\.)epsg$/.test(key)) return String(v);
  return fmt(v, decimalsOf(v));
}

/**
 * Render the report as one HTML document.
 *
 * @example writeFileSync(tmp, renderReport(input)); renameSync(tmp, join(out, "report.html"));
 */
export function renderReport(input: ReportInput, layers?: DemLayers): string {
  const inp = compactReportInput(input, REPORT_MAP_PX);
  const s = inp.summary;
  const g = s.gsdCm;
  const view = mapView(inp.dem, 1000);
  const r = inp.rasters;
  // The DEM's own layers: made beforehand when given for this DEM (demLayers.ts), else here.
  const dl = layers && layers.key === demLayersKey(inp.dem) ? layers : demLayers(inp.dem);
  const shadeUri = dl.shadeUri;
  const shadeImg = (cls: string) => rasterImage(view, inp.dem.transform, inp.dem.width, inp.dem.height, shadeUri, cls);
  const site = (attrs: string) => sitePath(view, inp.site, attrs);
  const overlays = scaleBar(view) + northArrow(view, inp.gridConvergenceDeg);
  // The side-by-side maps get a narrower view so their labels print at a readable size.
  const small = mapView(inp.dem, 620);
  const smallShade = (cls: string) => rasterImage(small, inp.dem.transform, inp.dem.width, inp.dem.height, shadeUri, cls);
  const smallSite = (attrs: string) => sitePath(small, inp.site, attrs);
  const smallOverlays = scaleBar(small) + northArrow(small, inp.gridConvergenceDeg);
  // Keep-out zones on every map: above the rasters and flags, below the legs. Each map has
  // its own pattern id, as ids are shared by the whole page.
  const zones = inp.keepOut?.zones ?? [];
  const zoneLayer = (v: MapView, map: string) => (zones.length ? `<g class="layer" data-layer="keep-out">${keepOutLayer(v, zones, `hatch-keep-out-${map}`)}</g>` : "");
  const zoneDefs = (map: string) => (zones.length ? keepOutHatch(`hatch-keep-out-${map}`) : "");

  // 1. Map
  const contours = dl.contours;
  // The drawing made from the legs' stations (compactReportInput made it, when not given).
  const drawing = inp.drawing!;
  const agl = drawing.agl;
  // Blocks: with one block the single take-off marker as before; with several, each take-off
  // point numbered and each block's extent outlined. The range circle about every take-off
  // point whenever the plan has a range limit.
  const blocks = inp.blocks ?? [];
  const multiBlock = blocks.length > 1;
  const rangeM = inp.maxRangeM ?? 0;
  const rangeCentres = multiBlock ? blocks.map((b) => ({ block: b.index, xy: [b.takeoff.x, b.takeoff.y] as XY })) : [{ ...(blocks[0] ? { block: blocks[0].index } : {}), xy: inp.takeoff }];
  const blockSvg = (multiBlock ? blockOutlines(view, blockExtents(inp.legs, blocks, s.lineSpacingM)) : "") + rangeCircles(view, rangeCentres, rangeM);
  const blockLayer = blockSvg ? `<g class="layer" data-layer="blocks">${blockSvg}</g>` : "";
  const takeoffs = multiBlock
    ? blockTakeoffMarkers(view, blocks)
    : takeoffMarker(view, inp.takeoff, blocks[0] ? { title: takeoffTitle(blocks[0]), attrs: `data-block="${blocks[0].index}" data-takeoff-from="${esc(blocks[0].takeoffFrom)}"` } : {});
  const proposedAny = blocks.some((b) => b.takeoffFrom === "proposed");
  const mainMap = mapSvg(
    view,
    "map-main",
    `Map: hill shade, contours, site, legs, waypoints and take-off${multiBlock ? " points of the blocks" : ""}${rangeM > 0 ? ", range" : ""}`,
    shadeImg("shade") +
      `<g class="layer" data-layer="contours">${contours.svg}</g>` +
      site(`fill="#ffffff" fill-opacity="0.12" stroke="#111" stroke-width="2" stroke-dasharray="8 4"`) +
      zoneLayer(view, "main") +
      blockLayer +
      `<g class="layer" data-layer="legs">${legsLayer(view, inp.legs, drawing.runs)}</g>` +
      `<g class="layer" data-layer="contours-labels">${contours.labels}</g>` +
      takeoffs +
      overlays,
    zoneDefs("main"),
  );

  // 2. GSD and image maps
  const outBand = outOfBandMask(r, g.low, g.high);
  const gsdUri = pngDataUri(r.width, r.height, gsdRgba(r, g.target, g.low, g.high));
  const gsdMap = mapSvg(
    small,
    "map-gsd",
    "Map of nadir GSD over the site",
    smallShade("shade faint") +
      rasterImage(small, r.transform, r.width, r.height, gsdUri, "raster") +
      outlinePath(small, r.transform, maskOutline(outBand, r.width, r.height), `fill="url(#hatch-outband)" stroke="#111" stroke-width="0.7" stroke-opacity="0.8"`) +
      smallSite(`fill="none" stroke="#111" stroke-width="1.5"`) +
      zoneLayer(small, "gsd") +
      smallOverlays,
    hatchPattern("hatch-outband", "#111", 45, 6) + zoneDefs("gsd"),
  );
  const maxImages = maxSiteImages(r);
  const minImages = inp.minImages;
  const fewMask = minImages !== undefined ? fewImagesMask(r, minImages) : new Uint8Array(r.width * r.height);
  const imgMap = mapSvg(
    small,
    "map-images",
    "Map of image count per ground cell",
    smallShade("shade faint") +
      rasterImage(small, r.transform, r.width, r.height, pngDataUri(r.width, r.height, imagesRgba(r, maxImages)), "raster") +
      outlinePath(small, r.transform, maskOutline(fewMask, r.width, r.height), `fill="url(#hatch-few)" stroke="#d62728" stroke-width="1.2"`) +
      smallSite(`fill="none" stroke="#111" stroke-width="1.5"`) +
      zoneLayer(small, "images") +
      smallOverlays,
    hatchPattern("hatch-few", "#d62728", -45, 6) + zoneDefs("images"),
  );

  // 3. Flags
  let flagLayers = "";
  let flagDefs = "";
  // The bits present anywhere first, so a mask is made only for a kind the map shows.
  const flags = r.flags;
  const bitsPresent = flagBitsPresent(flags);
  for (const k of ASSESSMENT_FLAG_KINDS) {
    if (!(bitsPresent & k.bit)) continue;
    const mask = flagBitMask(flags, k.bit);
    const st = FLAG_STYLE[k.key];
    flagDefs += hatchPattern(`hatch-flag-${k.key}`, st.colour, st.angle, 7);
    flagLayers += `<g class="flag-layer" data-kind="${esc(k.key)}">${outlinePath(small, r.transform, maskOutline(mask, r.width, r.height), `fill="url(#hatch-flag-${k.key})" stroke="${st.colour}" stroke-width="1.2"`)}</g>`;
  }
  // Drawn on the narrower view (the figure is about 620 px wide) so its scale bar and
  // north arrow print at the size of the GSD maps'.
  const flagMap = mapSvg(
    small,
    "map-flags",
    "Map of flagged ground by kind",
    smallShade("shade") + smallSite(`fill="#fff" fill-opacity="0.25" stroke="#111" stroke-width="1.5"`) + flagLayers + zoneLayer(small, "flags") + smallOverlays,
    flagDefs + zoneDefs("flags"),
  );
  const byKind = s.flagged?.byKind ?? {};
  // A share of the site; a tiny non-zero one is not printed as 0.0.
  const pctText = (p: number) => (p > 0 && p < 0.05 ? "< 0.1" : fmt(p, 1)) + " %";
  let flagRows = "";
  // Kinds present on this site first, in their usual order; the others follow, muted.
  const present = (k: FlagKind) => (byKind[k.key]?.cells ?? 0) > 0;
  const kindsInOrder = [...ASSESSMENT_FLAG_KINDS.filter(present), ...ASSESSMENT_FLAG_KINDS.filter((k) => !present(k))];
  for (const k of kindsInOrder) {
    const f = byKind[k.key];
    const st = FLAG_STYLE[k.key];
    const has = f && f.cells > 0;
    flagRows +=
      `<tr class="${has ? "flag-present" : "flag-absent"}" data-kind="${esc(k.key)}">` +
      `<td><svg class="swatch" viewBox="0 0 22 16" width="22" height="16"><defs>${hatchPattern(`hatch-swatch-${k.key}`, st.colour, st.angle, 5)}</defs><rect x="0.5" y="0.5" width="21" height="15" fill="url(#hatch-swatch-${k.key})" stroke="${st.colour}" stroke-width="1.2"/></svg></td>` +
      `<td><strong>${esc(k.label)}</strong><br><span class="muted">${EFFECT_KEYS.has(k.key) ? "effect" : "cause"}</span></td>` +
      `<td class="r">${f ? num(`flagged.byKind.${k.key}.areaM2`, f.areaM2, fmtArea(f.areaM2)) : "–"}</td>` +
      `<td class="r">${f && f.pct !== undefined ? num(`flagged.byKind.${k.key}.pct`, f.pct, pctText(f.pct)) : "–"}</td>` +
      `<td>${esc(k.explanation)}</td><td>${esc(k.remedy)}</td></tr>`;
  }

  // Keep-out zones: what each took from the site. Zones may overlap, so no total.
  const zoneRows = zones
    .map((z, i) => {
      const key = `keepOut.zones.${i}`;
      return (
        `<tr data-zone="${i}"><td>${esc(z.name)}</td><td><code>${esc(z.source)}</code></td>` +
        `<td class="r">${z.bufferM > 0 ? num(`${key}.bufferM`, z.bufferM, `${fmt(z.bufferM)} m`) : "none"}</td>` +
        `<td class="r">${num(`${key}.siteRemovedM2`, z.siteRemovedM2, `${fmt(z.siteRemovedM2, 0)} m²`)}</td>` +
        `<td class="r">${num(`${key}.siteRemovedPct`, z.siteRemovedPct, pctText(z.siteRemovedPct))}</td></tr>`
      );
    })
    .join("");
  const zoneTable = zones.length
    ? `<h3>Keep-out zones</h3><table class="zones" id="keep-out-table"><thead><tr><th>Zone</th><th>File</th><th class="r">Buffer</th><th class="r">Site removed</th><th class="r">Share</th></tr></thead><tbody>${zoneRows}</tbody></table>` +
      `<p class="muted">No leg enters a zone or its buffer; strips stop at the buffer and transits go around it. The site area inside a zone or its buffer is not flown over.</p>`
    : "";

  // 4. Profiles
  const profiles = stripProfiles(drawing.strips);
  const profileHtml = profiles
    .map((p) => `<figure class="profile" data-strip="${esc(p.strip)}">${p.svg}</figure>`)
    .join("");

  // 5. Comparison
  const b = inp.baseline;
  const cmpRow = (label: string, planKey: string, planV: number | undefined, baseKey: string, baseV: number | undefined, d?: number) =>
    `<tr><th>${esc(label)}</th><td class="r">${planV === undefined ? "–" : num(planKey, planV, fmt(planV, d))}</td><td class="r">${baseV === undefined ? "–" : num(baseKey, baseV, fmt(baseV, d))}</td></tr>`;
  const spread = (x: { p5: number; p95: number }) => x.p95 - x.p5;
  const comparison = b
    ? `<p class="lead">At one constant altitude of ${num("baseline.altitudeAmslM", b.altitudeAmslM, fmt(b.altitudeAmslM, 1))} m AMSL ` +
      `(${num("baseline.heightAboveMedianGroundM", b.heightAboveMedianGroundM, fmt(b.heightAboveMedianGroundM, 1))} m above the site's median ground), ` +
      `${fmt(b.withinBandPct, 1)} % of the site would be inside the GSD band; terrain following gives ${fmt(s.withinBandPct, 1)} %.</p>` +
      `<table class="cmp"><thead><tr><th></th><th class="r">This plan</th><th class="r">One constant altitude</th></tr></thead><tbody>` +
      cmpRow("Within the band, %", "withinBandPct", s.withinBandPct, "baseline.withinBandPct", b.withinBandPct, 1) +
      cmpRow("GSD 5th percentile, cm/px", "gsdCm.p5", g.p5, "baseline.gsdCm.p5", b.gsdCm.p5, 2) +
      cmpRow("GSD median, cm/px", "gsdCm.median", g.median, "baseline.gsdCm.median", b.gsdCm.median, 2) +
      cmpRow("GSD 95th percentile, cm/px", "gsdCm.p95", g.p95, "baseline.gsdCm.p95", b.gsdCm.p95, 2) +
      cmpRow("GSD spread p95 − p5, cm/px", "derived.plan.gsdSpreadCm", spread(g), "derived.baseline.gsdSpreadCm", spread(b.gsdCm), 2) +
      cmpRow("GSD min, cm/px", "gsdCm.min", g.min, "baseline.gsdCm.min", b.gsdCm.min, 2) +
      cmpRow("GSD max, cm/px", "gsdCm.max", g.max, "baseline.gsdCm.max", b.gsdCm.max, 2) +
      cmpRow("Ceiling breaches, cells", "planCeilingBreaches.cells", inp.planCeilingBreaches?.cells, "baseline.ceilingBreaches.cells", b.ceilingBreaches.cells) +
      cmpRow("Ceiling breaches, m²", "planCeilingBreaches.areaM2", inp.planCeilingBreaches?.areaM2, "baseline.ceilingBreaches.areaM2", b.ceilingBreaches.areaM2, 0) +
      cmpRow("Images per cell, min", "images.min", s.images?.min, "baseline.images.min", b.images?.min) +
      (b.clearanceShortfall
        ? `<tr><th>Site closer than ${esc(fmt(b.clearanceShortfall.clearanceM))} m clearance, m²</th><td class="r">–</td><td class="r">${num("baseline.clearanceShortfall.areaM2", b.clearanceShortfall.areaM2, fmt(b.clearanceShortfall.areaM2, 0))}</td></tr>`
        : "") +
      `</tbody></table>` +
      (b.maxSiteGroundM !== undefined
        ? `<p>The highest ground in the site is ${num("baseline.maxSiteGroundM", b.maxSiteGroundM, fmt(b.maxSiteGroundM, 1))} m AMSL: ${b.altitudeAmslM > b.maxSiteGroundM ? `one constant altitude clears it by only ${esc(fmt(b.altitudeAmslM - b.maxSiteGroundM, 1))} m` : `one constant altitude is ${esc(fmt(b.maxSiteGroundM - b.altitudeAmslM, 1))} m below it, into the hill`}` +
          (b.clearanceShortfall && b.clearanceShortfall.cells > 0
            ? `, less than the plan's clearance of ${esc(fmt(b.clearanceShortfall.clearanceM))} m over ${esc(fmtArea(b.clearanceShortfall.areaM2))} of the site (the ground straight below; the plan also keeps it within its safety radius).</p>`
            : ".</p>")
        : "") +
      (inp.planCeilingBreaches && inp.planCeilingBreaches.cells > 0
        ? `<p>This plan breaks the ceiling over ${esc(fmtArea(inp.planCeilingBreaches.areaM2))}: where clearance and the ceiling conflict it keeps clearance (see the warnings in section 6 and the unflyable stretches in the profiles). Get permission or change the layout before flying there.</p>`
        : "") +
      `<p class="muted">Both columns come from the same independent per-cell check of the flown exposures; the constant altitude flies the same strips.</p>`
    : `<p class="muted">The constant-altitude comparison was not computed for this plan.</p>`;

  // 6. Numbers
  const flightsTable = flightTable(inp.flights ?? [], rangeM);
  let numberRows = "";
  for (const [key, v] of flattenNumbers(s)) {
    numberRows += `<tr><th>${esc(labelFor(key))}</th><td class="r">${num(key, v, tableText(key, v))}</td></tr>`;
  }
  const words: [string, unknown][] = [
    ["Binding speed limit", s.speedLimit],
    ["Ceiling reference", s.ceiling?.reference],
    ["Vertical datum", s.verticalDatum],
  ];
  for (const [label, v] of words) if (v !== undefined) numberRows += `<tr><th>${esc(label)}</th><td class="r">${esc(v)}</td></tr>`;
  const hist = inp.gsdHistogram!;
  const cautions = [...new Set([...inp.cautions, ...(s.cautions ?? []), ...STANDARD_CAUTIONS])];
  const warnings = (s.warnings ?? []).map((w) => (typeof w === "string" ? w : w.message));
  const a = inp.assumptions;
  const surfaceText =
    a.surfaceModel === "DTM"
      ? "DTM (bare earth): trees, buildings and masts are not in it. Clearance includes the obstacle margin only."
      : a.surfaceModel === "DSM"
        ? "DSM (surface with trees and buildings): clearance is to the mapped surface; thin obstacles such as wires may still be missing."
        : "Unknown whether the DEM is bare earth or surface: treat it as bare earth and allow for obstacles.";

  const headline = [
    ["Within band", num("withinBandPct", s.withinBandPct, fmt(s.withinBandPct, 1)), "% of site"],
    ["Median GSD", num("gsdCm.median", g.median, fmt(g.median, 2)), `cm/px (target ${fmt(g.target, 2)})`],
    ["Flights", s.flights !== undefined ? num("flights", s.flights) : "–", s.batteries !== undefined ? `${fmt(s.batteries)} ${s.batteries === 1 ? "battery" : "batteries"}` : ""],
    ["Flight time", s.flightTimeS !== undefined ? num("flightTimeS", s.flightTimeS, fmtDuration(s.flightTimeS)) : "–", ""],
    ["Waypoints", s.waypoints !== undefined ? num("waypoints", s.waypoints) : "–", s.strips !== undefined ? `${fmt(s.strips)} strips` : ""],
    ["Flagged", s.flagged ? num("flagged.areaM2", s.flagged.areaM2, fmtArea(s.flagged.areaM2)) : "–", "of ground"],
  ]
    .map(([t, v, u]) => `<div class="kpi"><div class="kpi-t">${t}</div><div class="kpi-v">${v}</div><div class="kpi-u">${esc(u)}</div></div>`)
    .join("");

  const script = LAYER_SCRIPT;
  const scriptHash = createHash("sha256").update(script, "utf8").digest("base64");
  const csp = `default-src 'none'; img-src data:; style-src 'unsafe-inline'; script-src 'sha256-${scriptHash}'; base-uri 'none'; form-action 'none'`;
  const title = `GSD report — ${inp.siteName}`;
  const files = inp.files;
  const fileList = [
    files.planFile ? ["Plan file", files.planFile] : null,
    files.dem ? ["DEM", files.dem] : null,
    files.area ? ["Site", files.area] : null,
  ].filter(Boolean) as [string, string][];

  return `<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="${esc(csp)}">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>${esc(title)}</title>
<style>${REPORT_CSS}</style></head>
<body>
<header class="top">
<div><div class="eyebrow">gsdplan · GSD-variation report</div><h1 id="site-name">${esc(inp.siteName)}</h1>
<p class="muted">${fileList.map(([k, v]) => `${esc(k)}: <code>${esc(v)}</code>`).join(" · ")}${inp.generatedAt ? ` · generated ${esc(inp.generatedAt)}` : ""}${inp.toolVersion ? ` · gsdplan ${esc(inp.toolVersion)}` : ""}</p></div>
</header>
<div class="kpis">${headline}</div>
<aside class="caution-box"><strong>Before you fly.</strong> ${esc(STANDARD_CAUTIONS[0])} ${esc(STANDARD_CAUTIONS[5])}</aside>

<section id="map"><h2>1 · Map</h2>
<p class="muted">Hill shade by Horn's method (sun 315°, 45°), contours every ${fmt(contours.intervalM)} m (heavier every ${fmt(contours.intervalM * 5)} m), site outline dashed, strips coloured by height above ground, transits dashed, bridges over unflyable stretches red, waypoints as dots.${multiBlock ? ` Take-off points numbered by block${proposedAny ? " (hollow where proposed: the pilot must confirm access)" : ""}, each block's extent outlined blue.` : ""}${rangeM > 0 ? ` The dashed red circle is the range, ${esc(fmt(rangeM))} m from ${multiBlock ? "each" : "the"} take-off point.` : ""}${zones.length ? ` Keep-out zones hatched magenta${zones.some((z) => z.bufferM > 0) ? ", their buffers dashed" : ""}.` : ""} ${inp.crsName ? `Grid: ${esc(inp.crsName)}.` : ""}</p>
<div class="toggles no-print"><label><input type="checkbox" data-toggle="contours" checked> contours</label><label><input type="checkbox" data-toggle="legs" checked> legs and waypoints</label>${zones.length ? `<label><input type="checkbox" data-toggle="keep-out" checked> keep-out zones</label>` : ""}${blockLayer ? `<label><input type="checkbox" data-toggle="blocks" checked> ${multiBlock ? "blocks and ranges" : "range"}</label>` : ""}</div>
<figure class="mapfig">${mainMap}<figcaption>${sequentialLegend("Height above ground on the strips", "m", agl[0], agl[1])}${keepOutLegend(zones, "hatch-keep-out-legend-main")}${blocksLegend({ blocks: blocks.length, proposed: proposedAny, rangeM })}</figcaption></figure>
</section>

<section id="gsd"><h2>2 · Ground sample distance</h2>
<div class="two">
<figure class="mapfig">${gsdMap}<figcaption>${gsdLegend(g.target, g.low, g.high, "hatch-legend-outband")}</figcaption></figure>
<figure class="mapfig">${imgMap}<figcaption>${sequentialLegend("Images per ground cell", "count", 0, Math.max(1, maxImages), minImages !== undefined ? `<text x="336" y="33" class="small">hatched: fewer than ${esc(minImages)}</text>` : "")}</figcaption></figure>
</div>
<p class="muted">GSD is the nadir figure from the most nadir exposure over each ground cell, from the independent check of the final waypoints. Map cells are ${fmt(r.transform.dx, 1)} m; the figures in the tables are at full DEM resolution.${zones.length ? " Keep-out zones are hatched magenta, as on the map above." : ""}</p>
</section>

<section id="flags"><h2>3 · Flags</h2>
<figure class="mapfig narrow">${flagMap}${zones.length ? `<figcaption>${keepOutLegend(zones, "hatch-keep-out-legend-flags")}</figcaption>` : ""}</figure>
<table class="flags"><thead><tr><th></th><th>Kind</th><th class="r">Area</th><th class="r">Share</th><th>What it means</th><th>What you can do</th></tr></thead><tbody>${flagRows}</tbody></table>
<p class="muted">Effects say what is wrong with the ground cell; causes say why the plan could not do better there. A cell can carry several.</p>
${zoneTable}
</section>

<section id="profiles"><h2>4 · Strip profiles</h2>
<div class="profile-legend">${profileLegend()}</div>
<div class="profiles">${profileHtml || '<p class="muted">No strips.</p>'}</div>
</section>

<section id="compare"><h2>5 · What terrain following buys</h2>${comparison}</section>

<section id="numbers"><h2>6 · Numbers</h2>
<div class="two">
<div><h3>Summary</h3><table class="numbers" id="summary-table"><tbody>${numberRows}</tbody></table></div>
<div>
<h3>GSD distribution</h3>${gsdHistogramSvg(hist, g.target, g.low, g.high, inp.baselineHistogram)}
<h3>Flights and batteries</h3>
<p>${s.flights !== undefined ? num("flights", s.flights) : "–"} ${s.flights === 1 ? "flight" : "flights"}, ${s.batteries !== undefined ? num("batteries", s.batteries) : "–"} ${s.batteries === 1 ? "battery" : "batteries"}, ${s.flightTimeS !== undefined ? esc(fmtDuration(s.flightTimeS)) : "–"} in the air over ${s.pathLengthM !== undefined ? esc(fmt(s.pathLengthM / 1000, 2)) : "–"} km. ${multiBlock ? `The site is flown in ${esc(blocks.length)} blocks; each flight starts and ends at its block's take-off point (see the map and the flights table).` : "Each flight starts and ends at the take-off point."}</p>
${crossStripsParagraph(s.crossStrips)}
<h3>Vertical references</h3>
<table class="numbers"><tbody>
<tr><th>DEM heights</th><td>${esc(inp.verticalReferences.demDatum)}</td></tr>
<tr><th>Geoid model</th><td>${esc(inp.verticalReferences.geoidModel)}</td></tr>
${inp.verticalReferences.altitudes.map((x) => `<tr><th><code>${esc(x.name)}</code></th><td>${esc(x.reference)}</td></tr>`).join("")}
</tbody></table>
<h3>Assumptions</h3>
<ul><li>${esc(surfaceText)}</li>
${s.surfaces && s.surfaces.ceiling === "dtm" ? `<li>${esc(`Surface and terrain: clearance and GSD on the surface model (${s.surfaces.clearance.toUpperCase()}); the ceiling, the take-off ground and height_above_terrain_m on the terrain model (DTM); height_above_ground_m is above the surface.`)}</li>` : ""}
<li>DEM vertical accuracy: ${a.demAccuracyM !== undefined ? `${esc(fmt(a.demAccuracyM, 1))} m` : "not stated"}; clearance can be trusted only to within it.</li>
${(a.notes ?? []).map((n) => `<li>${esc(n)}</li>`).join("")}</ul>
</div></div>
${flightsTable}
${warnings.length ? `<h3>Warnings</h3><ul class="warnings">${warnings.map((w) => `<li>${esc(w)}</li>`).join("")}</ul>` : ""}
<h3>Cautions</h3><ul class="cautions">${cautions.map((c) => `<li>${esc(c)}</li>`).join("")}</ul>
</section>
<footer class="muted">Generated by gsdplan. This report supports planning; it is not permission to fly.</footer>
<script type="application/json" id="summary-data">${jsonForScript(s)}</script>
<script>${script}</script>
</body></html>
`;
}

// The maps' per-cell passes, each a function that ends with its loop (a bare return after it
// needs no type feedback): as loops of renderReport each was compiled mid-call with the
// page's code after it not yet run, and sent the whole function back to the interpreter
// (seven compiles of it on the demo, node --trace-opt).

/** 1 where a site cell's GSD lies outside [low, high]. */
function outOfBandMask(r: ReportInput["rasters"], low: number, high: number): Uint8Array {
  const out = new Uint8Array(r.width * r.height);
  for (let i = 0; i < out.length; i++) {
    const v = r.gsdCm[i];
    out[i] = r.inSite[i] && v === v && (v < low || v > high) ? 1 : 0;
  }
  return out;
}

/** The largest image count over the site (0 for none). */
function maxSiteImages(r: ReportInput["rasters"]): number {
  const { images, inSite } = r;
  let most = 0;
  for (let i = 0; i < images.length; i++) if (inSite[i] && images[i] > most) most = images[i];
  return most;
}

/** 1 where a site cell has fewer than minImages images. */
function fewImagesMask(r: ReportInput["rasters"], minImages: number): Uint8Array {
  const out = new Uint8Array(r.width * r.height);
  for (let i = 0; i < out.length; i++) out[i] = r.inSite[i] && r.images[i] < minImages ? 1 : 0;
  return out;
}

/** The OR of every cell's flags. */
function flagBitsPresent(flags: ReportInput["rasters"]["flags"]): number {
  let any = 0;
  for (let i = 0; i < flags.length; i++) any |= flags[i];
  return any;
}

/** 1 where a cell carries `bit`. */
function flagBitMask(flags: ReportInput["rasters"]["flags"], bit: number): Uint8Array {
  const mask = new Uint8Array(flags.length);
  for (let i = 0; i < mask.length; i++) if (flags[i] & bit) mask[i] = 1;
  return mask;
}

/**
 * The flights table: one row per flight as flights.csv holds it, with the farthest point of
 * each flight from its take-off point against the range. Empty without flights.
 */
/** The cross-strip line of the numbers section: what each family adds (summary.json `crossStrips`). */
function crossStripsParagraph(c: unknown): string {
  const x = c as { first?: Record<string, number>; second?: Record<string, number>; imagesMedianBoth?: number } | undefined;
  if (!x?.first || !x.second) return "";
  const f = x.first, t = x.second;
  return `<h3>Cross strips</h3>
<p id="cross-strips">A second family of ${num("crossStrips.second.strips", t.strips)} strips at ${esc(fmt(t.headingDeg, 1))}°, across the first family's ${num("crossStrips.first.strips", f.strips)} at ${esc(fmt(f.headingDeg, 1))}°, flown after them: ` +
    `it adds ${num("crossStrips.second.photos", t.photos)} photos to ${esc(fmt(f.photos))} and ${esc(fmtDuration(t.flightTimeS))} of flight to ${esc(fmtDuration(f.flightTimeS))} (${esc(fmt(t.flights))} ${t.flights === 1 ? "flight" : "flights"}). ` +
    `Median images per ground cell: ${num("crossStrips.first.imagesMedian", f.imagesMedian)} from the first family alone, ${num("crossStrips.second.imagesMedian", t.imagesMedian)} from the cross strips alone, ` +
    `${x.imagesMedianBoth !== undefined ? num("crossStrips.imagesMedianBoth", x.imagesMedianBoth) : "–"} from both. GSD per cell still comes from the most nadir photo of either family.</p>`;
}

function flightTable(flights: NonNullable<ReportInput["flights"]>, rangeM: number): string {
  if (!flights.length) return "";
  const rows = flights
    .map((f, i) => {
      const key = `flights.${i}`;
      const over = rangeM > 0 && f.maxRangeM > rangeM;
      // No-break spaces keep each distance with its unit when the column wraps.
      const far = num(`${key}.maxRangeM`, f.maxRangeM, `${fmt(f.maxRangeM, 0)}\u00a0m`) + (rangeM > 0 ? ` of ${esc(fmt(rangeM))}\u00a0m` : "") + (over ? " (beyond the range)" : "");
      return (
        `<tr data-flight="${esc(f.flight)}" data-block="${esc(f.block)}"${over ? ` class="over-range"` : ""}>` +
        `<td class="r">${num(`${key}.flight`, f.flight)}</td>` +
        `<td class="r">${num(`${key}.block`, f.block)}</td>` +
        `<td class="r latlon">${num(`${key}.takeoffLatitude`, f.takeoffLatitude, f.takeoffLatitude.toFixed(6))}, ${num(`${key}.takeoffLongitude`, f.takeoffLongitude, f.takeoffLongitude.toFixed(6))}</td>` +
        `<td class="r">${num(`${key}.takeoffGroundAmslM`, f.takeoffGroundAmslM, fmt(f.takeoffGroundAmslM, 1))}</td>` +
        `<td class="r">${num(`${key}.waypoints`, f.waypoints)}</td>` +
        `<td class="r">${num(`${key}.photos`, f.photos)}</td>` +
        `<td class="r">${num(`${key}.lengthM`, f.lengthM, fmt(f.lengthM, 0))}</td>` +
        `<td class="r">${num(`${key}.durationS`, f.durationS, fmtMinSec(f.durationS))}</td>` +
        `<td class="r far">${far}</td>` +
        `<td>${f.resumesStrip !== null && f.resumesStrip !== undefined ? `resumes strip ${num(`${key}.resumesStrip`, f.resumesStrip)}` : ""}</td></tr>`
      );
    })
    .join("");
  return (
    `<h3>Flights</h3><table class="flights" id="flights-table"><thead><tr>` +
    `<th class="r">Flight</th><th class="r">Block</th><th class="r">Take-off lat, lon, °</th><th class="r">Take-off ground, m AMSL</th>` +
    `<th class="r">Way&shy;points</th><th class="r">Photos</th><th class="r">Length, m</th><th class="r">Duration, min:s</th>` +
    `<th class="r">Farthest from take-off${rangeM > 0 ? " / range" : ""}</th><th>Strip</th></tr></thead><tbody>${rows}</tbody></table>` +
    `<p class="muted">One row per flight, as in <code>flights.csv</code>. Take-off points in WGS84 degrees; ground heights above mean sea level, as <code>waypoints.csv</code> writes them. ` +
    `The farthest distance is horizontal, from the flight's own take-off point to its farthest waypoint (legs are straight between waypoints). ` +
    `A flight that resumes a strip starts it at the waypoint where the previous flight stopped.</p>`
  );
}

/** Layer toggles: the only script on the page (allowed by its hash in the CSP). */
const LAYER_SCRIPT = `(function(){var b=document.querySelectorAll('input[data-toggle]');for(var i=0;i<b.length;i++){b[i].addEventListener('change',function(e){var t=e.target,k=t.getAttribute('data-toggle'),g=document.querySelectorAll('#map-main [data-layer="'+k+'"],#map-main [data-layer="'+k+'-labels"]');for(var j=0;j<g.length;j++){g[j].style.display=t.checked?'':'none';}});}})();`;

export type { ReportInput, ReportSummary };
export type { MapView };
