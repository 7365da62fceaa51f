/**
 * Bad plan options and sites (issues 3 and 4, "Bad input") through `gsdplan plan`.
 * Each row overrides one key of the small plan with a flag, or names a bad site file
 * from fixtures/e2e (bad-site-*.geojson, bad-plan-*.yaml).
 */
import { describe } from "vitest";
import { BASE_PLAN, badInputCases, type BadCase } from "./badInputs.js";

// Flags taking a negative number are written --flag=-5 so the value is not read as a flag.
const plan = (name: string, says: RegExp, ...flags: string[]): BadCase => ({ name, args: ["plan", BASE_PLAN, ...flags, "--out", "OUT"], says });

const cases: BadCase[] = [
  // Issue 3: camera, requirement, overlap.
  plan("front overlap of 100 %", /frontPct|front-overlap/, "--front-overlap-pct", "100"),
  plan("front overlap above 100 %", /frontPct|front-overlap/, "--front-overlap-pct", "120"),
  plan("negative side overlap", /sidePct|side-overlap/, "--side-overlap-pct=-5"),
  plan("tolerance of 0 %", /tolerancePct|tolerance/, "--tolerance-pct", "0"),
  plan("tolerance of 100 %", /tolerancePct|tolerance/, "--tolerance-pct", "100"),
  plan("focal length 0", /focalLengthMm|focal-length/, "--focal-length-mm", "0"),
  plan("negative sensor width", /sensorWidthMm|sensor-width/, "--sensor-width-mm=-6.3"),
  plan("sensor height 0", /sensorHeightMm|sensor-height/, "--sensor-height-mm", "0"),
  plan("image width 0 px", /imageWidthPx|image-width/, "--image-width-px", "0"),
  plan("image height negative", /imageHeightPx|image-height/, "--image-height-px=-3000"),
  plan("both sensor size and field of view", /camera/, "--hfov-deg", "70"),
  { name: "neither sensor size nor field of view", args: ["plan", "fixtures/e2e/bad-plan-camera-neither.yaml", "--out", "OUT"], says: /camera/ },
  // Issue 3: the site.
  plan("self-intersecting site", /self-intersect|cross/i, "--area", "fixtures/e2e/bad-site-bowtie.geojson"),
  plan("site with fewer than 3 distinct corners", /distinct corner/, "--area", "fixtures/e2e/bad-site-two-corners.geojson"),
  plan("site wholly outside the DEM", /outside the DEM/, "--area", "fixtures/e2e/bad-site-outside-dem.geojson"),
  plan("site in another CRS (UTM metres, GeoJSON crs member)", /crs.*WGS84|WGS84.*crs/i, "--area", "fixtures/e2e/bad-site-utm-crs.geojson"),
  // Issue 4: the solver's limits.
  plan("ceiling below the minimum clearance", /ceiling/, "--ceiling-m", "20"),
  plan("climb rate 0", /maxClimbMps|max-climb/, "--max-climb-mps", "0"),
  plan("negative descent rate", /maxDescentMps|max-descent/, "--max-descent-mps=-1"),
  // 0.5 cm/px needs 0.005 * 4.5 mm / 1.575 um = 14.3 m above ground, under the 30 m clearance.
  plan("target GSD whose height is below the clearance everywhere", /clearance/, "--gsd-cm", "0.5"),
  // 5 cm/px needs 142.9 m above ground (band 128.6-157.1 m), over the 120 m ceiling.
  plan("target GSD whose height is above the ceiling everywhere", /ceiling/, "--gsd-cm", "5"),
];

describe("bad plan options and sites: one line, exit 2", () => {
  badInputCases(cases);
});
