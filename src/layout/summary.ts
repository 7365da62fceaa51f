/**
 * The layout summary as text lines: what the pilot checks before flying the
 * strips. Pure formatting; the numbers come from the stages before.
 */
import type { Layout, Site } from "./types.js";
import { flightTimeS } from "./heading.js";

export interface LayoutSummaryInput {
  site: Site;
  layout: Layout;
  /** Photo ground speed and the limit that binds it (cruise, interval or blur). */
  speedMps: number;
  speedLimit: string;
  transitSpeedMps: number;
  /** Height above ground over flat ground for the target GSD, metres. */
  heightAglM?: number;
  targetGsdCm?: number;
  /** Extra lines (DEM coverage, frame choice...). */
  notes?: string[];
}

/**
 * Summary lines for the terminal.
 * @example layoutSummaryLines({ site, layout, speedMps: 8, speedLimit: "interval", transitSpeedMps: 12 }).join("\n")
 */
export function layoutSummaryLines(input: LayoutSummaryInput): string[] {
  const { site, layout } = input;
  const strips = layout.legs.filter((l) => l.kind === "strip");
  const stripCount = new Set(strips.map((l) => l.strip)).size;
  const stripLengthM = strips.reduce((s, l) => s + l.lengthM, 0);
  const transitM = layout.legs.filter((l) => l.kind === "transit").reduce((s, l) => s + l.lengthM, 0);
  const timeS = flightTimeS(layout.legs, input.speedMps, input.transitSpeedMps);
  const m = (x: number) => `${x.toFixed(1)} m`;
  const lines = [
    `site: ${site.name}, ${(site.areaM2 / 10_000).toFixed(2)} ha`,
    ...(input.targetGsdCm !== undefined && input.heightAglM !== undefined
      ? [`target GSD ${input.targetGsdCm.toFixed(2)} cm/px (nadir) at ${m(input.heightAglM)} above flat ground`]
      : []),
    `footprint ${m(layout.footprintAcrossM)} across x ${m(layout.footprintAlongM)} along the track`,
    `strips: ${stripCount} (${strips.length} strip legs), spacing ${m(layout.spacingM)}, trigger distance ${m(layout.triggerM)}`,
    `strip length ${(stripLengthM / 1000).toFixed(2)} km, transit ${(transitM / 1000).toFixed(2)} km, about ${Math.round(timeS / 60)} min at the speeds below (turns included)`,
    `ground speed ${input.speedMps.toFixed(1)} m/s on strips (limited by ${input.speedLimit}), ${input.transitSpeedMps.toFixed(1)} m/s in transit`,
    `heading ${layout.headingDeg} deg (clockwise from grid north of the local frame): ${layout.headingReason}`,
  ];
  const top = layout.headingCandidates.slice(0, 5);
  if (top.length > 1) {
    lines.push("top headings (deg: flight time, forced altitude change, score):");
    for (const c of top) lines.push(`  ${c.headingDeg}: ${Math.round(c.flightTimeS)} s, ${Math.round(c.altitudeChangeM)} m, ${Math.round(c.score)} s`);
  }
  for (const n of [...(site.notes ?? []), ...(input.notes ?? [])]) lines.push(`note: ${n}`);
  lines.push(
    "caution: this is a layout, not a flight permission. Fly within the law where you are, check airspace and temporary restrictions, keep visual line of sight where required; the DEM is not a survey of obstacles. The pilot in command decides.",
  );
  return lines;
}
