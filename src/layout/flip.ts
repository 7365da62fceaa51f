/**
 * The other boustrophedon order over the same strips: every strip flown the
 * other way, so the connectors between strips lie at the opposite ends. Used
 * when a connector has to cross ground where clearance and the ceiling
 * conflict: the other ends may not.
 */
import type { LayoutLeg, XY } from "./types.js";

/**
 * Legs with each strip's direction reversed (pieces of a concave strip in the
 * reverse order), transits rebuilt from the take-off, between the strip legs
 * and back. Strip numbers and flight order of the strips are kept.
 * @example flipStripDirections(layout.legs, layout.takeoff).filter((l) => l.kind === "strip")[0].from // the old first strip's end
 */
export function flipStripDirections(legs: readonly LayoutLeg[], takeoff: XY): LayoutLeg[] {
  const strips: LayoutLeg[][] = [];
  for (const leg of legs) {
    if (leg.kind !== "strip") continue;
    const group = strips[strips.length - 1];
    if (group && group[0].strip === leg.strip) group.push(leg);
    else strips.push([leg]);
  }
  const out: LayoutLeg[] = [];
  let here: XY = takeoff;
  const transit = (strip: number, to: XY) => {
    out.push({ kind: "transit", strip, from: here, to, lengthM: Math.hypot(to[0] - here[0], to[1] - here[1]) });
    here = to;
  };
  for (const group of strips) {
    for (const leg of [...group].reverse()) {
      transit(leg.strip, leg.to);
      const flipped: LayoutLeg = { kind: "strip", strip: leg.strip, from: leg.to, to: leg.from, lengthM: leg.lengthM };
      if (leg.noPhotoIntervals?.length) {
        flipped.noPhotoIntervals = leg.noPhotoIntervals.map(([a, b]) => [leg.lengthM - b, leg.lengthM - a] as [number, number]).reverse();
      }
      if (leg.photoGrid) {
        // The same photo positions counted from the other end.
        const { firstM, everyM } = leg.photoGrid;
        flipped.photoGrid = { firstM: (((leg.lengthM - firstM) % everyM) + everyM) % everyM, everyM };
      }
      out.push(flipped);
      here = flipped.to;
    }
  }
  transit(strips.length ? strips[strips.length - 1][0].strip : 1, takeoff);
  return out;
}
