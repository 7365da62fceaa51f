import { describe, it, expect } from "vitest";
import fc from "fast-check";
import { booleanPointInPolygon, point } from "@turf/turf";
import { layoutStrips } from "../../src/layout/strips.js";
import type { Site } from "../../src/layout/types.js";

/** Star-shaped (often concave) simple polygon around the origin: sorted angles, random radii. */
function starSite(radii: number[]): Site {
  const n = radii.length;
  const ring = radii.map((r, i) => [r * Math.cos((2 * Math.PI * i) / n), r * Math.sin((2 * Math.PI * i) / n)]);
  ring.push([...ring[0]]);
  const poly = { type: "Polygon" as const, coordinates: [ring] };
  return { local: poly, wgs84: poly, areaM2: 0, name: "star" };
}

function distToSegment(p: number[], a: number[], b: number[]): number {
  const dx = b[0] - a[0];
  const dy = b[1] - a[1];
  const len2 = dx * dx + dy * dy;
  const t = len2 > 0 ? Math.max(0, Math.min(1, ((p[0] - a[0]) * dx + (p[1] - a[1]) * dy) / len2)) : 0;
  return Math.hypot(p[0] - a[0] - t * dx, p[1] - a[1] - t * dy);
}

describe("side coverage holds on random concave sites at random headings (property, fast-check)", () => {
  it("every lattice point of the site lies within half a spacing of a strip leg (turf booleanPointInPolygon)", () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: 40, max: 300, noNaN: true }), { minLength: 5, maxLength: 14 }),
        fc.double({ min: 0, max: 179.9, noNaN: true }),
        fc.double({ min: 15, max: 60, noNaN: true }),
        (radii, headingDeg, spacingM) => {
          const site = starSite(radii);
          const layout = layoutStrips(site, { headingDeg, spacingM, triggerM: 10, footprintAcrossM: spacingM * 2, footprintAlongM: 20, photoSpeedMps: 8, transitSpeedMps: 12 });
          const legs = layout.legs.filter((l) => l.kind === "strip");
          const step = 12;
          for (let x = -300; x <= 300; x += step) {
            for (let y = -300; y <= 300; y += step) {
              if (!booleanPointInPolygon(point([x, y]), site.local)) continue;
              let d = Infinity;
              for (const l of legs) d = Math.min(d, distToSegment([x, y], l.from, l.to));
              if (d > spacingM / 2 + 1e-6) return false;
            }
          }
          return true;
        },
      ),
      { numRuns: 40, seed: 7 },
    );
  });
});
