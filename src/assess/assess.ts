import type { MultiPolygon, Polygon } from "geojson";
import type { Camera, Requirement } from "../camera/types.js";
import type { DemGrid } from "../dem/grid.js";
import { InputError } from "../errors.js";
import { startCoverage, type Coverage, type CoverageOptions, type StartedCoverage } from "./coverage.js";
import { bandPool as newBandPool, bandThreads, type BandPool } from "./bandThreads.js";
import type { NadirBy } from "./coverageKernel.js";
import { exposuresFromLegs, type AssessedLeg, type ExposureOptions } from "./exposures.js";
import { paintCauseZones, paintKeepOutCuts } from "./flagRaster.js";
import { flagPolygons, type ToWgs84 } from "./flagPolygons.js";
import { rasteriseSite } from "./siteMask.js";
import { assessmentStats } from "./stats.js";
import type { Assessment } from "./types.js";
import type { GsdTallyGrid } from "./gsdTally.js";
import type { XY } from "../layout/types.js";

/**
 * The independent check of a plan: from the final waypoints, place the
 * photos, intersect their footprints with the terrain at full DEM resolution
 * and measure every site cell's GSD and image count; flag what is wrong
 * (the assessment's own measurement) and why (the solver's causes, painted
 * from its stations); summarise and vectorise the flags.
 */

export interface AssessOptions {
  /** Distance between photos along a strip, metres. */
  triggerM: number;
  /** Fewest photos a cell must be in; fewer sets the too-few-images flag. Default 2 (stereo minimum). */
  minImages?: number;
  /** Across-track half-width of each station's zone (half the strip spacing), metres. */
  zoneHalfAcrossM: number;
  /** Vectorise the flags into polygons (default true); a comparison run may skip it. */
  polygons?: boolean;
  /** Local frame to WGS84 for the flag polygons. */
  toWgs84: ToWgs84;
  /** Where the first photo of each strip falls (see exposuresFromLegs). */
  phase?: ExposureOptions["phase"];
  /** How the most nadir photo is chosen (see NadirBy): default `image`, the smallest view angle. */
  nadirBy?: NadirBy;
  /** Threads for the coverage pass (see CoverageOptions). */
  threads?: number;
  /** Band workers to use, started ahead and ended by the caller (bandThreads.ts BandPool); default: the assessment's own. */
  bandPool?: BandPool;
  /**
   * Stretches of strips cut at keep-out zones, with the footprint they would have
   * imaged: too-few-images cells under them get the keep-out bit.
   */
  keepOut?: { cuts: readonly { from: XY; to: XY }[]; footprintAcrossM: number; footprintAlongM: number };
  /** Keep the raster of each cell's nadir strip in the result (default false: only the statistics use it, and it is dropped). */
  keepNadirStrip?: boolean;
  /** The site mask, when the caller has made it already (siteMaskFor with the same site and grid). */
  inSite?: Uint8Array;
  /** Also count the seen site cells whose GSD is at least this, cm/px (stats.gsdAtLeast): e.g. the plan's own ceiling breaches (see ceilingBreachGsdCm). */
  countGsdAtLeastCm?: number;
  /** Also tally the seen site cells' GSD on this grid (stats.gsdTally), for histograms read off it (report/histogram.ts histogramOfTally). */
  gsdTally?: GsdTallyGrid;
  /** Called once the rasters are final, before the statistics and polygons are made from them (which must not change them). */
  onRasters?: (rasters: Assessment["rasters"]) => void;
  /**
   * A sweep started ahead (startAssessmentSweep): taken over when it was made on the same grid,
   * site mask, camera and sweep options and its photos are these legs' to the bit; else
   * cancelled and the sweep made afresh.
   */
  early?: EarlySweep;
}

/** A footprint sweep started ahead of its assessment (startAssessmentSweep). */
export interface EarlySweep {
  started: StartedCoverage;
  camera: Camera;
  options: CoverageOptions;
}

/**
 * The site's cells on the grid (rasteriseSite), in shared memory where the banded passes
 * will use threads, so they (and other workers) read it without a copy each.
 * @example const inSite = siteMaskFor(grid, site.local); assessPlan(grid, site.local, legs, camera, req, { ...o, inSite })
 */
export function siteMaskFor(grid: Pick<DemGrid, "width" | "height" | "transform">, site: Polygon | MultiPolygon, threads?: number): Uint8Array {
  const { width, height, transform } = grid;
  return rasteriseSite(site, width, height, transform, bandThreads(width * height, 2, threads) > 1);
}

/**
 * @example
 * const a = assessPlan(grid, site.local, solved.legs, camera, requirement, {
 *   triggerM: layout.triggerM, zoneHalfAcrossM: layout.spacingM / 2, toWgs84: frame.toWgs84,
 * });
 * a.stats.withinBandPct; a.rasters.gsdCm; a.polygons.coarse;
 */
export function assessPlan(
  grid: DemGrid,
  site: Polygon | MultiPolygon,
  legs: readonly AssessedLeg[],
  camera: Camera,
  requirement: Pick<Requirement, "lowGsdM" | "highGsdM">,
  opts: AssessOptions,
): Assessment {
  const minImages = checkedMinImages(requirement, opts);
  const { width, height, transform } = grid;
  const cellAreaM2 = grid.cellSizeM[0] * grid.cellSizeM[1];

  const inSite = opts.inSite ?? siteMaskFor(grid, site, opts.threads);
  if (inSite.length !== width * height) throw new Error(`site mask of ${inSite.length} cells for a ${width} x ${height} grid`);
  const exposures = exposuresFromLegs(legs, opts.triggerM, { phase: opts.phase });
  // One set of band workers for the sweep and the statistics' pass (bandThreads.ts BandPool):
  // the caller's, or one of its own ended here.
  const own = opts.bandPool ? undefined : newBandPool();
  try {
    return assessWithPool(grid, inSite, legs, camera, requirement, opts, exposures, minImages, cellAreaM2, opts.bandPool ?? own!);
  } finally {
    own?.close();
  }
}

/**
 * The footprint sweep of assessPlan started now on the band workers, from `legs`' photos, while
 * the caller goes on (the plan starts it from the solved strips while it routes and checks the
 * waypoints: the flights' legs place the same photos unless a strip was cut between flights).
 * Pass it to assessPlan as `early` with the same grid, camera, requirement and options.
 * @example const early = startAssessmentSweep(grid, site, solved.legs, camera, req, o); ...; assessPlan(grid, site, flown, camera, req, { ...o, early })
 */
export function startAssessmentSweep(
  grid: DemGrid,
  site: Polygon | MultiPolygon,
  legs: readonly AssessedLeg[],
  camera: Camera,
  requirement: Pick<Requirement, "lowGsdM" | "highGsdM">,
  opts: AssessOptions,
): EarlySweep {
  const minImages = checkedMinImages(requirement, opts);
  const inSite = opts.inSite ?? siteMaskFor(grid, site, opts.threads);
  const options = sweepOptions(requirement, opts, minImages, opts.bandPool);
  return { started: startCoverage(grid, inSite, exposuresFromLegs(legs, opts.triggerM, { phase: opts.phase }), camera, options), camera, options };
}

/** The minimum image count, after checking assessPlan's numeric inputs. */
function checkedMinImages(requirement: Pick<Requirement, "lowGsdM" | "highGsdM">, opts: AssessOptions): number {
  const minImages = opts.minImages ?? 2;
  if (!Number.isInteger(minImages) || minImages < 1 || minImages > 65535) {
    throw new InputError("minImages", minImages, "a whole number from 1 to 65535", "minimum image count out of range");
  }
  if (!(opts.zoneHalfAcrossM >= 0) || !Number.isFinite(opts.zoneHalfAcrossM)) {
    throw new InputError("zoneHalfAcrossM", opts.zoneHalfAcrossM, "a finite number of metres >= 0");
  }
  if (!(requirement.lowGsdM > 0 && requirement.highGsdM >= requirement.lowGsdM)) {
    throw new InputError("requirement", requirement, "0 < lowGsdM <= highGsdM", "GSD band is empty");
  }
  return minImages;
}

/** The footprint sweep's options for an assessment: the effect bits set band by band as soon as a band's photos are all counted. */
function sweepOptions(requirement: Pick<Requirement, "lowGsdM" | "highGsdM">, opts: AssessOptions, minImages: number, bandPool: BandPool | undefined): CoverageOptions {
  return {
    nadirBy: opts.nadirBy,
    threads: opts.threads,
    ...(bandPool ? { bandPool } : {}),
    effects: { lowGsdCm: requirement.lowGsdM * 100, highGsdCm: requirement.highGsdM * 100, minImages },
  };
}

/** True when two sweeps' options give the same rasters (the workers that run them aside). */
function sameSweep(a: CoverageOptions, b: CoverageOptions): boolean {
  const ea = a.effects, eb = b.effects;
  return a.nadirBy === b.nadirBy && a.threads === b.threads && a.rowsIn === b.rowsIn &&
    ea?.lowGsdCm === eb?.lowGsdCm && ea?.highGsdCm === eb?.highGsdCm && ea?.minImages === eb?.minImages;
}

/** The early sweep if it is this assessment's (see AssessOptions.early), else one started now (the early one cancelled). */
function sweepFor(grid: DemGrid, inSite: Uint8Array, exposures: ReturnType<typeof exposuresFromLegs>, camera: Camera, options: CoverageOptions, early: EarlySweep | undefined): StartedCoverage {
  if (early) {
    const s = early.started;
    if (s.grid === grid && s.inSite === inSite && early.camera === camera && sameSweep(early.options, options) && s.sameExposures(exposures)) return s;
    s.cancel();
  }
  return startCoverage(grid, inSite, exposures, camera, options);
}

/** assessPlan's passes, on `bandPool`'s workers. */
function assessWithPool(
  grid: DemGrid, inSite: Uint8Array, legs: readonly AssessedLeg[], camera: Camera, requirement: Pick<Requirement, "lowGsdM" | "highGsdM">, opts: AssessOptions,
  exposures: ReturnType<typeof exposuresFromLegs>, minImages: number, cellAreaM2: number, bandPool: BandPool,
): Assessment {
  const { width, height, transform } = grid;
  const sweep = sweepFor(grid, inSite, exposures, camera, sweepOptions(requirement, opts, minImages, bandPool), opts.early);
  const { gsdCm, images, nadirStrip, flags, seenByBand } = sweep.finish() as Required<Coverage>;
  paintCauseZones(flags, grid, inSite, legs, opts.zoneHalfAcrossM);
  if (opts.keepOut) paintKeepOutCuts(flags, grid, inSite, opts.keepOut.cuts, opts.keepOut.footprintAcrossM / 2, opts.keepOut.footprintAlongM / 2);

  const rasters = { width, height, transform, gsdCm, images, flags, inSite };
  opts.onRasters?.(rasters);
  // The coverage pass counted the seen cells for strips 0 .. the highest photo's strip.
  const maxStrip = seenByBand.strips - 1;
  const stats = assessmentStats({ gsdCm, images, flags, inSite, ground: grid.heights, nadirStrip, cellAreaM2, maxStrip, seenByBand, threads: opts.threads, bandPool, gsdAtLeastCm: opts.countGsdAtLeastCm, ...(opts.gsdTally ? { gsdTally: opts.gsdTally } : {}),
    // Each strip's first radix pass in the statistics' pass, over an eighth of the band's low
    // edge to eight times its high edge (three octaves either side, ~800 bins): a strip whose
    // wanted ranks (its extremes among them) lie beyond has its quantiles made by more passes.
    stripSpanCm: [(requirement.lowGsdM * 100) / 8, requirement.highGsdM * 100 * 8] });
  const polygons = opts.polygons === false ? {} : flagPolygons(flags, width, height, transform, opts.toWgs84, cellAreaM2);
  return {
    rasters: { ...rasters, ...(opts.keepNadirStrip ? { nadirStrip } : {}) },
    stats,
    polygons,
    exposures,
  };
}
