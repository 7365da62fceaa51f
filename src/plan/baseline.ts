/**
 * The naive plan a user would otherwise fly: the same strips at one constant
 * altitude, the height that gives the target GSD over the site's median
 * ground. Assessed by the same independent check, it shows what terrain
 * following buys (GSD spread, share in the band, ceiling breaches).
 */
import type { DemGrid } from "../dem/grid.js";
import type { Camera, Requirement } from "../camera/types.js";
import type { Layout, Site } from "../layout/types.js";
import type { CeilingReference } from "../solve/types.js";
import { straightTransitLeg } from "../route/flights.js";
import { assessPlan } from "../assess/assess.js";
import type { AssessedLeg } from "../assess/exposures.js";
import type { Assessment, AssessmentRasters, GsdStats } from "../assess/types.js";
import { quantilesFloat32 } from "../assess/quantiles.js";

export interface CeilingBreaches {
  cells: number;
  areaM2: number;
}

export interface Baseline {
  altitudeAmslM: number;
  heightAboveMedianGroundM: number;
  medianGroundM: number;
  assessment: Assessment;
  stats: {
    gsdCm: GsdStats;
    withinBandPct: number;
    images: { min: number; median: number };
    flaggedAreaM2: number;
    flaggedPct: number;
    ceilingBreaches: CeilingBreaches;
  };
  /** Our plan's site cells above the ceiling by the same measure (expected none). */
  planCeilingBreaches: CeilingBreaches;
}

export interface BaselineOptions {
  targetHeightM: number;
  triggerM: number;
  minImages: number;
  toWgs84: (x: number, y: number) => [number, number];
  ceiling: { heightM: number; reference: CeilingReference };
  takeoffGroundM: number;
  /** The terrain-following plan's rasters: its site mask and GSD give its own breaches. */
  planRasters: AssessmentRasters;
  /** Threads for the coverage pass (see CoverageOptions); default the assessment's own choice. */
  threads?: number;
}

/**
 * Assesses the constant-altitude plan over the layout's strips.
 * @example constantAltitudeBaseline(grid, site, layout, camera, req, { targetHeightM: 91, ... }).stats.withinBandPct
 */
export function constantAltitudeBaseline(
  grid: DemGrid,
  site: Site,
  layout: Layout,
  camera: Camera,
  requirement: Requirement,
  o: BaselineOptions,
): Baseline {
  const inSite = o.planRasters.inSite;
  const medianGroundM = medianSiteGround(grid, inSite);
  const altitudeAmslM = medianGroundM + o.targetHeightM;
  const legs: AssessedLeg[] = layout.legs
    .filter((l) => l.kind === "strip")
    // One straight leg per strip at the one altitude (the speed does not enter the assessment).
    .map((l) => ({
      ...straightTransitLeg(l.from, l.to, l.strip, { altitudeAmslM, speedMps: 1 }),
      kind: "strip" as const,
      ...(l.noPhotoIntervals ? { noPhotoIntervals: l.noPhotoIntervals } : {}),
    }));
  const assessment = assessPlan(grid, site.local, legs, camera, requirement, {
    triggerM: o.triggerM,
    minImages: o.minImages,
    zoneHalfAcrossM: layout.spacingM / 2,
    toWgs84: o.toWgs84,
    nadirBy: "distance",
    // Only its figures are compared; its flags are not drawn.
    polygons: false,
    ...(o.threads !== undefined ? { threads: o.threads } : {}),
  });
  const s = assessment.stats;
  return {
    altitudeAmslM,
    heightAboveMedianGroundM: o.targetHeightM,
    medianGroundM,
    assessment,
    stats: {
      gsdCm: s.gsdCm,
      withinBandPct: s.withinBandPct,
      images: s.images,
      flaggedAreaM2: s.flagged.areaM2,
      flaggedPct: s.siteCells > 0 ? (100 * s.flagged.cells) / s.siteCells : 0,
      ceilingBreaches: ceilingBreaches(grid, assessment.rasters, camera, o),
    },
    planCeilingBreaches: ceilingBreaches(grid, o.planRasters, camera, o),
  };
}

/**
 * Site cells whose most-nadir photo was taken above the ceiling. The camera
 * height over the cell follows from its measured GSD (H = GSD / ifov). The
 * `surface` rule is checked as `ground`, which counts at least as many
 * breaches (the closest surface point is never farther than the ground below).
 */
export function ceilingBreaches(
  grid: DemGrid,
  r: AssessmentRasters,
  camera: Camera,
  o: Pick<BaselineOptions, "ceiling" | "takeoffGroundM">,
): CeilingBreaches {
  // 1 cm of slack: heights are rebuilt from Float32 GSD values.
  const slackM = 0.01;
  let cells = 0;
  for (let i = 0; i < r.gsdCm.length; i++) {
    if (!r.inSite[i]) continue;
    const g = r.gsdCm[i];
    if (!(g > 0)) continue;
    const hM = g / 100 / camera.ifov;
    const over =
      o.ceiling.reference === "takeoff"
        ? grid.heights[i] + hM > o.takeoffGroundM + o.ceiling.heightM + slackM
        : hM > o.ceiling.heightM + slackM;
    if (over) cells++;
  }
  return { cells, areaM2: cells * grid.cellSizeM[0] * grid.cellSizeM[1] };
}

function medianSiteGround(grid: DemGrid, inSite: Uint8Array): number {
  const z = new Float32Array(inSite.length);
  for (let i = 0; i < inSite.length; i++) z[i] = inSite[i] ? grid.heights[i] : NaN;
  return quantilesFloat32(z, [0.5])[0];
}
