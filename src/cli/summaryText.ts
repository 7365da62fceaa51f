import { ASSESSMENT_FLAG_KINDS } from "../assess/flags.js";
import type { PlanSummary } from "../plan/summary.js";

/**
 * The terminal summary: the numbers a pilot checks first, what each flag
 * means where the plan has it, warnings, and the cautions.
 * @example process.stdout.write(summaryText(summary, "out/"))
 */
export function summaryText(s: PlanSummary, outDir: string, opts: { explainAllFlags?: boolean } = {}): string {
  const f = (v: number, d = 1) => (Number.isFinite(v) ? v.toFixed(d) : "n/a");
  const lines: string[] = [];
  lines.push(`gsdplan: ${s.site} (${f(s.areaM2 / 10000, 2)} ha) in ${s.frame.name}`);
  lines.push(
    `  strips ${s.strips} at heading ${f(s.headingDeg)} deg, spacing ${f(s.lineSpacingM)} m, photos every ${f(s.triggerDistanceM)} m (${s.photos} photos)`,
  );
  lines.push(`  heading: ${s.headingReason}`);
  lines.push(`  ground speed ${f(s.speedMps)} m/s (limited by ${s.speedLimit}); target height ${f(s.targetHeightAglM)} m above ground`);
  lines.push(
    `  ${s.waypoints} waypoints in ${s.flights} flight(s) (${s.batteries} batteries), ${f(s.pathLengthM / 1000, 2)} km, ${f(s.flightTimeS / 60)} min`,
  );
  lines.push(
    `  GSD cm/px: target ${f(s.gsdCm.target, 2)} [band ${f(s.gsdCm.low, 2)}-${f(s.gsdCm.high, 2)}], measured min ${f(s.gsdCm.min, 2)} p5 ${f(s.gsdCm.p5, 2)} median ${f(s.gsdCm.median, 2)} p95 ${f(s.gsdCm.p95, 2)} max ${f(s.gsdCm.max, 2)}`,
  );
  lines.push(`  within band: ${f(s.withinBandPct)} % of site cells; images per cell min ${s.images.min}, median ${s.images.median} (required ${s.images.required})`);
  const c = s.constantAltitude;
  lines.push(
    `  one constant altitude instead (${f(c.altitudeAmslM)} m AMSL): within band ${f(c.withinBandPct)} %, GSD p5-p95 ${f(c.gsdCm.p5, 2)}-${f(c.gsdCm.p95, 2)} cm/px, ceiling broken over ${f(c.ceilingBreachAreaM2, 0)} m2`,
  );
  if (s.blocks && s.blocks.length > 1) {
    const proposed = s.blocks.filter((b) => b.takeoffFrom === "proposed").length;
    lines.push(`  ${s.blocks.length} blocks within the ${s.maxRangeM} m range, each from its own take-off point${proposed ? ` (${proposed} proposed: confirm access on site)` : ""}`);
  }
  const k = s.keepOut;
  if (k && k.zones.length) {
    const zones = k.zones.map((z) => `${z.name} (${z.bufferM ? `buffer ${z.bufferM} m, ` : ""}${f(z.siteRemovedPct)} % of the site)`).join("; ");
    lines.push(`  keep-out zones: ${zones}; strips cut over ${f(k.stripCutM, 0)} m`);
  }
  if (k && k.routedTransits) lines.push(`  ${k.routedTransits} transit(s) routed around keep-out zones or unknown ground, ${f(k.detourM, 0)} m longer than straight`);
  lines.push(`  ceiling ${s.ceiling.heightM} m, rule: ${s.ceiling.rule}`);
  lines.push(`  heights: AMSL (${s.verticalDatum}), ellipsoidal via ${s.geoidModel}, and above take-off (ground ${f(s.takeoff.groundAmslM, 2)} m AMSL)`);
  const flagged = ASSESSMENT_FLAG_KINDS.filter((k) => (s.flagged.byKind[k.key]?.cells ?? 0) > 0);
  if (flagged.length) {
    lines.push(
      `  flagged: ${f(s.flagged.areaM2, 0)} m2 (${f(s.flagged.pct, 2)} % of the site), of which ${f(s.flagged.effectAreaM2, 0)} m2 measured out of band or short of images; the rest carries only a cause`,
    );
    for (const k of opts.explainAllFlags ? ASSESSMENT_FLAG_KINDS : flagged) {
      const v = s.flagged.byKind[k.key];
      lines.push(`    [${k.bit}] ${k.label}: ${f(v?.areaM2 ?? 0, 0)} m2 (${f(v?.pct ?? 0, 2)} %). ${k.explanation}`);
      lines.push(`         what to do: ${k.remedy}`);
    }
  } else {
    lines.push("  flagged: nothing");
  }
  for (const w of s.warnings) lines.push(`  warning: ${w}`);
  lines.push("  cautions:");
  for (const w of s.cautions) lines.push(`    - ${w}`);
  lines.push(`  outputs in ${outDir} (open report.html to review the plan)`);
  return lines.join("\n") + "\n";
}
