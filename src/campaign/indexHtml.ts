/**
 * index.html at the top of a campaign's output folder: offline and self-contained
 * (inline CSS and SVG, no scripts, no fonts or images from elsewhere). A table of the
 * sites with their headline figures and links to each site's report, and the overview
 * map. Written as well-formed XML too, so any XML parser reads it.
 */
import { STANDARD_CAUTIONS } from "../cautions.js";
import { esc } from "../report/escape.js";
import type { OverviewMap } from "./overviewMap.js";
import { STATUS_TEXT, type SiteOutcome } from "./types.js";

export interface IndexSite {
  number: number;
  name: string;
  outcome: SiteOutcome;
  /** The site's report, relative to index.html and URL-encoded; absent when there is none. */
  reportHref?: string;
}

export interface IndexInput {
  /** The campaign file's name (no folders). */
  campaignFile: string;
  sites: IndexSite[];
  map: OverviewMap | null;
  generatedAt?: string;
  toolVersion?: string;
}

/**
 * A site's report link relative to index.html: the folder name percent-encoded
 * (RFC 3986), so spaces, "#", "?" and "%" in a name stay part of the path.
 * @example reportHref("North #2") // "North%20%232/report.html"
 */
export function reportHref(name: string): string {
  return `${encodeURIComponent(name)}/report.html`;
}

/**
 * The page.
 * @example await writeFile("out/index.html", campaignIndexHtml({ campaignFile: "c.yaml", sites, map }))
 */
export function campaignIndexHtml(input: IndexInput): string {
  const n = (v: number, d: number) => (Number.isFinite(v) ? v.toFixed(d) : "");
  const count = (s: SiteOutcome["status"]) => input.sites.filter((x) => x.outcome.status === s).length;
  const rows = input.sites.map((s) => {
    const o = s.outcome;
    const f = o.status === "failed" ? null : o.figures;
    const name = s.reportHref ? `<a href="${esc(s.reportHref)}">${esc(s.name)}</a>` : esc(s.name);
    const cells = [
      `<td class="num">${s.number}</td>`,
      `<td>${name}</td>`,
      `<td class="status ${o.status}">${esc(STATUS_TEXT[o.status])}</td>`,
      ...(f
        ? [n(f.areaM2 / 10_000, 2), String(f.flights), String(f.batteries), String(f.photos), n(f.flightTimeS / 60, 1), n(f.withinBandPct, 1), n(f.flaggedPct, 1)].map((v) => `<td class="num">${esc(v)}</td>`)
        : Array.from({ length: 7 }, () => `<td class="num"></td>`)),
      `<td class="error">${o.status === "failed" ? esc(o.error) : ""}</td>`,
    ];
    return `<tr>${cells.join("")}</tr>`;
  });
  const done = input.sites.flatMap((s) => (s.outcome.status === "failed" ? [] : [s.outcome.figures]));
  const sum = (k: "areaM2" | "flights" | "batteries" | "photos" | "flightTimeS") => done.reduce((a, f) => a + f[k], 0);
  const totals = `<tr class="totals"><td></td><td>all ${done.length} planned</td><td></td>` +
    [n(sum("areaM2") / 10_000, 2), String(sum("flights")), String(sum("batteries")), String(sum("photos")), n(sum("flightTimeS") / 60, 1)].map((v) => `<td class="num">${v}</td>`).join("") +
    `<td></td><td></td><td></td></tr>`;
  const m = input.map;
  const mapBlock = m
    ? `${m.svg}<p class="muted">Local equirectangular projection about ${n(m.lat0, 4)}&#176;, ${n(m.lon0, 4)}&#176; ` +
      `(x = R cos &#966;0 &#916;&#955;, y = R &#916;&#966;, R = 6 371 008.8 m): north is up; true to scale along the central parallel, ` +
      `east-west distances off by up to ${n(m.edgeScaleErrorPct, m.edgeScaleErrorPct < 0.1 ? 3 : 1)} % at the map's top and bottom edges. ` +
      `Numbers are the sites of the table (moved out on a grey line where they would overlap); outlines of failed sites are dashed red. Percentages in the table are of each site's DEM cells.</p>`
    : `<p class="muted">No site outline could be read for the map.</p>`;
  const meta = [input.generatedAt ? `generated ${esc(input.generatedAt)}` : "", input.toolVersion ? `gsdplan ${esc(input.toolVersion)}` : ""].filter(Boolean).join(" &#183; ");
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8"/>
<meta name="viewport" content="width=device-width, initial-scale=1"/>
<title>Campaign ${esc(input.campaignFile)}: ${input.sites.length} sites</title>
<style>
body { font: 14px/1.4 system-ui, sans-serif; margin: 1.5em; color: #222; }
h1 { font-size: 1.4em; margin: 0 0 0.3em; }
table { border-collapse: collapse; margin: 1em 0; }
th, td { border-bottom: 1px solid #ddd; padding: 0.25em 0.6em; text-align: left; vertical-align: top; }
th { background: #f3f3f3; }
td.num { text-align: right; font-variant-numeric: tabular-nums; }
td.failed { color: #a00; font-weight: bold; }
td.error { color: #a00; max-width: 32em; }
tr.totals td { font-weight: bold; border-top: 2px solid #999; }
.muted { color: #666; font-size: 0.9em; max-width: 60em; }
svg.overview { border: 1px solid #ccc; max-width: 100%; height: auto; }
svg .map-bg { fill: #fafaf7; }
svg .outline { fill: rgba(30, 110, 200, 0.25); stroke: #1e6ec8; stroke-width: 1.5; }
svg .outline.failed { fill: rgba(200, 30, 30, 0.15); stroke: #c81e1e; stroke-dasharray: 4 3; }
svg .marker circle { fill: #fff; stroke: #1e6ec8; stroke-width: 1.5; }
svg .marker.failed circle { stroke: #c81e1e; }
svg text { fill: #222; font-family: system-ui, sans-serif; }
svg line { stroke: #222; stroke-width: 1.5; }
svg line.leader { stroke: #888; stroke-width: 1; }
svg .north path { fill: #222; }
@media print { body { margin: 0; } }
</style>
</head>
<body>
<h1>Campaign: ${esc(input.campaignFile)}</h1>
<p>${input.sites.length} sites: ${count("planned")} planned, ${count("skipped")} ${esc(STATUS_TEXT.skipped)}, ${count("failed")} failed.${meta ? ` <span class="muted">${meta}</span>` : ""}</p>
<table>
<thead><tr><th>#</th><th>site (report)</th><th>status</th><th>area (ha)</th><th>flights</th><th>batteries</th><th>photos</th><th>flight time (min)</th><th>within GSD band (%)</th><th>flagged (%)</th><th>error</th></tr></thead>
<tbody>
${rows.join("\n")}
${totals}
</tbody>
</table>
${mapBlock}
<h2>Cautions</h2>
<ul>
${STANDARD_CAUTIONS.map((c) => `<li>${esc(c)}</li>`).join("\n")}
</ul>
</body>
</html>
`;
}
