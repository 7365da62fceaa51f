import { describe, expect, it } from "vitest";
import { flipStripDirections } from "../../src/layout/flip.js";
import type { LayoutLeg } from "../../src/layout/types.js";

// Plane geometry of a boustrophedon (common practice: strips flown alternately): flipping
// every strip keeps the strips and their order and moves each connector to the other ends.
describe("flipStripDirections", () => {
  const leg = (kind: LayoutLeg["kind"], strip: number, from: [number, number], to: [number, number], extra: Partial<LayoutLeg> = {}): LayoutLeg => ({
    kind, strip, from, to, lengthM: Math.hypot(to[0] - from[0], to[1] - from[1]), ...extra,
  });
  // Two strips 40 m apart, 100 m long; strip 2 is cut by a notch into two pieces.
  const legs: LayoutLeg[] = [
    leg("transit", 1, [0, -10], [0, 0]),
    leg("strip", 1, [0, 0], [100, 0], { noPhotoIntervals: [[10, 20]] }),
    leg("transit", 2, [100, 0], [100, 40]),
    leg("strip", 2, [100, 40], [70, 40]),
    leg("transit", 2, [70, 40], [40, 40]),
    leg("strip", 2, [40, 40], [0, 40]),
    leg("transit", 2, [0, 40], [0, -10]),
  ];
  const flipped = flipStripDirections(legs, [0, -10]);

  it("flies every strip piece the other way, in the same strip order", () => {
    const strips = flipped.filter((l) => l.kind === "strip");
    expect(strips.map((l) => [l.strip, l.from, l.to])).toEqual([
      [1, [100, 0], [0, 0]],
      [2, [0, 40], [40, 40]],
      [2, [70, 40], [100, 40]],
    ]);
  });

  it("mirrors the no-photo intervals along the reversed strip", () => {
    expect(flipped.find((l) => l.kind === "strip")!.noPhotoIntervals).toEqual([[80, 90]]);
  });

  it("joins every leg to the next, from and back to the take-off, with the connector at the other ends", () => {
    for (let i = 1; i < flipped.length; i++) expect(flipped[i].from).toEqual(flipped[i - 1].to);
    expect(flipped[0].from).toEqual([0, -10]);
    expect(flipped[flipped.length - 1].to).toEqual([0, -10]);
    // The connector from strip 1 to strip 2 now runs along x = 0, not x = 100.
    expect(flipped[2]).toMatchObject({ kind: "transit", from: [0, 0], to: [0, 40], lengthM: 40 });
  });
});
