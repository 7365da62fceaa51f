/**
 * Property (fast-check): random rectangular sites, headings and ranges on a flat plane: the
 * blocks cover every strip of the layout (no stretch of a line is lost at a seam), and every
 * block lies within the range of its take-off point. Plane geometry, checked directly.
 */
import { describe, it, expect } from "vitest";
import fc from "fast-check";
import { readSite } from "../../src/layout/site.js";
import { layoutStrips } from "../../src/layout/strips.js";
import { planBlocks } from "../../src/plan/blocks.js";
import { makeGrid } from "../../src/dem/sample.js";
import { stripFrame, stripPieces } from "../../src/route/blocks.js";
import { UTM33, E0, N0, polygonText, rect } from "../layout/frame-helper.js";

describe("property: blocks cover the strips and keep within the range", () => {
  it("holds for random sites, headings and ranges (seeded)", () => {
    let inRange = 0, split = 0;
    fc.assert(
      fc.property(
        fc.integer({ min: 200, max: 2400 }),
        fc.integer({ min: 200, max: 1800 }),
        fc.integer({ min: 0, max: 179 }),
        fc.integer({ min: 150, max: 700 }),
        (w, h, heading, rangeM) => {
          const site = readSite(polygonText([rect(0, 0, w, h)]), UTM33);
          const layout = layoutStrips(site, { headingDeg: heading, spacingM: 40, triggerM: 20, footprintAcrossM: 120, footprintAlongM: 80, photoSpeedMps: 8, transitSpeedMps: 12 });
          const margin = 200;
          const grid = makeGrid({ width: Math.ceil((w + 2 * margin) / 5), height: Math.ceil((h + 2 * margin) / 5), x0: E0 - margin, y0: N0 + h + margin, cellM: 5, heights: () => 300 });
          const { blocks, warnings } = planBlocks({ layout, site, grid, rangeM, triggerM: 20, candidates: [], givenOne: false, keepOut: null });
          const frame = stripFrame(layout.headingDeg);
          // Every original strip piece is covered by the blocks' pieces on its line (within 1 m).
          const original = stripPieces(layout.legs, frame);
          const flown = blocks.flatMap((b) => stripPieces(b.legs, frame));
          for (const p of original) {
            const on = flown.filter((q) => Math.abs(q.c - p.c) < 1e-6).sort((u, v) => u.a0 - v.a0);
            let reached = p.a0;
            for (const q of on) if (q.a0 <= reached + 1) reached = Math.max(reached, q.a1);
            expect(reached).toBeGreaterThanOrEqual(p.a1 - 1);
          }
          // Each block within the range of its take-off point (unless a range warning says otherwise).
          if (blocks.length > 1) split++;
          if (!warnings.some((x) => x.code === "range")) {
            inRange++;
            for (const b of blocks) {
              for (const l of b.legs) for (const p of [l.from, l.to]) expect(Math.hypot(p[0] - b.takeoff[0], p[1] - b.takeoff[1])).toBeLessThanOrEqual(rangeM + 1e-6);
            }
          }
        },
      ),
      { numRuns: 40, seed: 14 },
    );
    // The checks ran: most sites needed several blocks, and most blocks found a take-off point in range.
    expect(split).toBeGreaterThan(20);
    expect(inRange).toBeGreaterThan(30);
  }, 120_000);
});
