/**
 * Blocks and resumed strips, in the strip frame: worked by hand below (plane geometry),
 * and photo positions of a cut strip against the uncut one.
 */
import { describe, it, expect } from "vitest";
import { blockGrid, blockLegs, blocksOf, farthestFromM, stripFrame, type StripPiece } from "../../src/route/blocks.js";
import { cutLegAt } from "../../src/route/resume.js";
import { exposuresFromLegs, type AssessedLeg } from "../../src/assess/exposures.js";
import type { SolvedLeg, StationProfile } from "../../src/solve/types.js";

describe("blockGrid", () => {
  it("fits a block's farthest point within the range less the slack from its centre, with the fewest blocks", () => {
    // 3000 m of strips along, 60 lines 40 m apart (2360 m across), 500 m range, 25 m seam growth.
    const g = blockGrid(3000, 60, 40, 500, 25);
    const reach = 500 - g.slackM;
    const perBlock = Math.ceil(60 / g.across);
    const halfC = ((perBlock - 1) * 40) / 2;
    const halfA = 3000 / g.along / 2 + 25;
    expect(Math.hypot(halfA, halfC)).toBeLessThanOrEqual(reach);
    // One block fewer either way no longer fits (the least count the rule allows).
    const fits = (along: number, across: number) => Math.hypot(3000 / along / 2 + (along > 1 ? 25 : 0), ((Math.ceil(60 / across) - 1) * 40) / 2) <= reach;
    let least = Infinity;
    for (let a = 1; a <= 40; a++) for (let c = 1; c <= 60; c++) if (fits(a, c)) least = Math.min(least, a * c);
    expect(g.along * g.across).toBe(least);
  });

  it("one block when everything is within reach", () => {
    expect(blockGrid(400, 5, 40, 500, 25)).toMatchObject({ along: 1, across: 1 });
  });
});

describe("blocksOf and blockLegs", () => {
  const frame = stripFrame(90); // along = east, across = south
  const pieces: StripPiece[] = [0, 40, 80, 120].map((c, i) => ({ strip: i + 1, c, a0: 0, a1: 1000 }));
  const blocks = blocksOf(pieces, { along: 2, across: 2, slackM: 0 }, 20);
  it("cuts lines into groups across and equal lengths along, each seam halfway between two photos (500 m -> 510 m for photos every 20 m)", () => {
    expect(blocks).toHaveLength(4);
    expect(blocks.map((b) => [b.aMin, b.aMax, b.cMin, b.cMax])).toEqual([
      [0, 510, 0, 40],
      [510, 1000, 0, 40],
      [0, 510, 80, 120],
      [510, 1000, 80, 120],
    ]);
  });
  it("flies a block back and forth from the end nearest its take-off, and numbers strips on", () => {
    const t = frame.toXY(0, -10);
    const { legs, lastStrip } = blockLegs(blocks[0], frame, t, 7, 20);
    expect(legs.map((l) => l.kind)).toEqual(["transit", "strip", "transit", "strip", "transit"]);
    expect(legs.filter((l) => l.kind === "strip").map((l) => l.strip)).toEqual([7, 8]);
    expect(lastStrip).toBe(8);
    expect(legs[1].from).toEqual(frame.toXY(0, 0));
    expect(legs[1].to).toEqual(frame.toXY(510, 0));
    expect(legs[3].from).toEqual(frame.toXY(510, 40));
    // The farthest strip end from the take-off point: (510, 40) from (0, -10).
    expect(farthestFromM(blocks[0], frame, t)).toBeCloseTo(Math.hypot(510, 50), 9);
  });
  it("keeps each line's photos on one grid across the seam: 0, 20, ..., 500 in one block, 520, ..., 1000 in the next", () => {
    const photosOf = (legs: ReturnType<typeof blockLegs>["legs"]) =>
      legs.filter((l) => l.kind === "strip").flatMap((l) => {
        const [a0] = frame.toAC(l.from), [a1] = frame.toAC(l.to);
        const dir = Math.sign(a1 - a0);
        const out: number[] = [];
        for (let s = l.photoGrid!.firstM; s <= l.lengthM + 1e-9; s += l.photoGrid!.everyM) out.push(Math.round((a0 + dir * s) * 1e6) / 1e6);
        return out.map((a) => [frame.toAC(l.from)[1], a]);
      });
    const west = photosOf(blockLegs(blocks[0], frame, frame.toXY(0, -10), 1, 20).legs);
    const east = photosOf(blockLegs(blocks[1], frame, frame.toXY(1000, -10), 1, 20).legs);
    for (const c of [0, 40]) {
      const along = [...west, ...east].filter(([cc]) => Math.abs(cc - c) < 1e-6).map(([, a]) => a).sort((u, v) => u - v);
      expect(along).toEqual(Array.from({ length: 51 }, (_, k) => k * 20));
    }
  });
});

describe("cutLegAt: a strip resumed after a battery change", () => {
  // A 100 m strip east at 8 m/s, climbing linearly from 500 to 520 m, one waypoint in the middle.
  const n = 101;
  const s = Float64Array.from({ length: n }, (_, k) => k);
  const prof: StationProfile = {
    s, x: Float64Array.from(s), y: new Float64Array(n), groundM: new Float64Array(n).fill(400),
    hardLowM: new Float64Array(n), hardHighM: new Float64Array(n), bandLowM: new Float64Array(n), bandHighM: new Float64Array(n),
    altitudeM: Float64Array.from(s, (v) => 500 + v / 5), status: new Uint8Array(n), cause: new Uint8Array(n),
  };
  const wp = (x: number, speed: number) => ({ x, y: 0, s: x, altitudeAmslM: 500 + x / 5, groundAmslM: 400, heightAboveGroundM: 100 + x / 5, speedMps: speed });
  const leg: SolvedLeg = { kind: "strip", strip: 3, from: [0, 0], to: [100, 0], waypoints: [wp(0, 0), wp(50, 8), wp(100, 8)], profile: prof, lengthM: 100, timeS: 12.5 };
  const parts = cutLegAt(leg, 37, 15)!;

  it("meets at the cut point at the path's height there, times adding up", () => {
    expect(parts[0].to).toEqual([37, 0]);
    expect(parts[1].from).toEqual([37, 0]);
    expect(parts[0].waypoints[parts[0].waypoints.length - 1].altitudeAmslM).toBeCloseTo(500 + 37 / 5, 9);
    expect(parts[1].waypoints[0].altitudeAmslM).toBeCloseTo(500 + 37 / 5, 9);
    expect(parts[0].timeS + parts[1].timeS).toBeCloseTo(12.5, 9);
    expect(parts[0].lengthM + parts[1].lengthM).toBeCloseTo(100, 9);
  });

  it("places the photos exactly where the uncut strip places them: 0, 15, ..., 90", () => {
    const whole = exposuresFromLegs([leg as AssessedLeg], 15).map((e) => e.x);
    const cut = exposuresFromLegs(parts as AssessedLeg[], 15).map((e) => e.x);
    expect(whole).toEqual([0, 15, 30, 45, 60, 75, 90]);
    expect(cut.map((v) => Math.round(v * 1e9) / 1e9)).toEqual(whole);
  });
});
