/** The report's stylesheet: system fonts only, screen and print (A4 and US Letter). */
export const REPORT_CSS = `
:root{--ink:#1d1d1f;--muted:#5f6368;--line:#d9d9d6;--bg:#ffffff;--panel:#f6f6f4;--accent:#1f5f8b}
*{box-sizing:border-box}
html{font-family:system-ui,-apple-system,"Segoe UI",Roboto,"Noto Sans","Liberation Sans",Arial,sans-serif;color:var(--ink);background:var(--bg);font-size:15px;line-height:1.45}
body{margin:0 auto;max-width:1180px;padding:24px 28px 40px}
h1{font-size:1.9rem;margin:.1rem 0 .3rem;letter-spacing:-.01em}
h2{font-size:1.3rem;margin:2.2rem 0 .6rem;padding-bottom:.3rem;border-bottom:2px solid var(--ink)}
h3{font-size:1rem;margin:1.2rem 0 .4rem}
.eyebrow{text-transform:uppercase;letter-spacing:.08em;font-size:.75rem;color:var(--accent);font-weight:600}
.muted{color:var(--muted);font-size:.88rem}
code{font-family:ui-monospace,"SFMono-Regular",Menlo,Consolas,"Liberation Mono",monospace;font-size:.85em;background:var(--panel);padding:0 .25em;border-radius:3px;word-break:break-all}
.kpis{display:grid;grid-template-columns:repeat(6,1fr);gap:10px;margin:16px 0}
.kpi{background:var(--panel);border:1px solid var(--line);border-radius:6px;padding:10px 12px}
.kpi-t{font-size:.75rem;text-transform:uppercase;letter-spacing:.05em;color:var(--muted)}
.kpi-v{font-size:1.45rem;font-weight:650;font-variant-numeric:tabular-nums}
.kpi-u{font-size:.78rem;color:var(--muted)}
.caution-box{border-left:4px solid #e66101;background:#fff6ee;padding:8px 12px;font-size:.9rem;margin:8px 0 0}
figure{margin:0}
.mapfig{background:var(--panel);border:1px solid var(--line);border-radius:6px;padding:8px}
.mapfig.narrow{max-width:680px}
svg.map{display:block;width:100%;height:auto;font-size:13px}
svg.map text{font-family:inherit;fill:#111}
svg.map .contour-labels text{font-size:11px;fill:#4a3526;paint-order:stroke;stroke:#fff;stroke-width:3px;stroke-opacity:.85;text-anchor:middle;dominant-baseline:middle}
svg.map .halo{paint-order:stroke;stroke:#fff;stroke-width:3px;font-weight:600}
svg .small{font-size:10.5px;fill:#555}
svg.map image.raster{image-rendering:pixelated}
svg.map image.faint{opacity:.45}
svg.legend{display:block;width:100%;max-width:520px;height:auto;font-size:11px;margin-top:6px}
svg.chart,svg.profile-svg{display:block;width:100%;height:auto;font-size:11px}
svg text{font-family:inherit}
.two{display:grid;grid-template-columns:1fr 1fr;gap:16px}
.toggles{margin:.3rem 0 .5rem;font-size:.88rem}
.toggles label{margin-right:1rem}
.profiles{display:grid;grid-template-columns:1fr 1fr;gap:12px}
.profile{background:var(--panel);border:1px solid var(--line);border-radius:6px;padding:6px}
.profile-legend svg{max-width:900px}
table{border-collapse:collapse;width:100%;font-size:.88rem}
th,td{border-bottom:1px solid var(--line);padding:5px 8px;text-align:left;vertical-align:top}
thead th{font-size:.78rem;text-transform:uppercase;letter-spacing:.04em;color:var(--muted);border-bottom:1.5px solid var(--ink)}
td.r,th.r{text-align:right;font-variant-numeric:tabular-nums;white-space:nowrap}
table.numbers th{font-weight:500;color:#333}
table.cmp{max-width:720px}
table.cmp tbody th{font-weight:500}
tr.flag-absent{color:var(--muted)}
table.flights th,table.flights td{padding:4px 5px}
table.flights thead th{letter-spacing:0}
table.flights th.r,table.flights td.latlon,table.flights td.far{white-space:normal}
table.flights td.latlon .num{white-space:nowrap}
tr.over-range td.far{color:#b40426;font-weight:600}
tr.flag-absent td:nth-child(n+5){font-size:.8rem}
.swatch{display:block}
.lead{font-size:1.05rem}
ul{padding-left:1.2rem}
ul.cautions li,ul.warnings li{margin:.2rem 0}
ul.warnings{color:#8a3b00}
footer{margin-top:2.5rem;border-top:1px solid var(--line);padding-top:.6rem}
@media (max-width:900px){.two,.profiles{grid-template-columns:1fr}.kpis{grid-template-columns:repeat(3,1fr)}}
@page{size:auto;margin:14mm 12mm}
@media print{
  html{font-size:10.5pt}
  body{max-width:none;padding:0}
  .no-print{display:none}
  h2{break-after:avoid;page-break-after:avoid}
  h3{break-after:avoid;page-break-after:avoid}
  section{break-before:page;page-break-before:always}
  section#map{break-before:auto;page-break-before:auto}
  figure,.profile,.kpi,table.cmp,tr,svg{break-inside:avoid;page-break-inside:avoid}
  .profiles{grid-template-columns:1fr 1fr}
  .mapfig{border:none;padding:0;background:none}
  .kpis{grid-template-columns:repeat(6,1fr);gap:6px}
  a{color:inherit;text-decoration:none}
}
`;
