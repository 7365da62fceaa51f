/**
 * The naive plan a user would otherwise fly: the same strips at one constant
 * altitude, the height that gives the target GSD over the site's median
 * ground. Measured by the assessment's own rules, it shows what terrain
 * following buys (GSD spread, share in the band, ceiling breaches).
 *
 * At one altitude A the nadir GSD of a seen cell depends on its own ground
 * only, (A - g) * ifov, whichever photo sees it; the image counts come from
 * the photo lattices strip by strip (latticeCoverage.ts), so no footprint
 * sweep is needed. The figures are those the assessment would give for these
 * photos (test/plan/baseline.test.ts compares the two).
 */
import type { DemGrid } from "../dem/grid.js";
import type { Camera, Requirement } from "../camera/types.js";
import type { Layout } from "../layout/types.js";
import type { CeilingReference } from "../solve/types.js";
import { footprintPixels } from "../assess/coverage.js";
import { photoLattice, photoPhaseOn } from "../assess/exposures.js";
import { latticeCountsByBand, type LatticeStrip } from "../assess/latticeCoverage.js";
import { ASSESSMENT_FLAG_KINDS, BAND_SLACK, FLAG_VALUES, FLAG_COARSE, FLAG_FEW_IMAGES, FLAG_FINE, FLAG_NODATA } from "../assess/flags.js";
import type { AssessmentRasters, GsdStats } from "../assess/types.js";
import { RADIX_BINS, countStatsOfHistogram, float32Keys, interpolate, orderStatisticsOfRadix, radixBin, ranksOf } from "../assess/quantiles.js";
import { medianOfSiteGround, siteGround } from "../assess/siteGround.js";
import { histogramCounter, histogramOfTally } from "../report/histogram.js";
import { tallyCounter, tallyEdges, tallyOfSlots, type BinCounter, type GsdTally, type GsdTallyGrid } from "../assess/gsdTally.js";
import type { Histogram } from "../report/model.js";
import { zeroFilled } from "../zeroFill.js";

export interface CeilingBreaches {
  cells: number;
  areaM2: number;
}

export interface Baseline {
  altitudeAmslM: number;
  heightAboveMedianGroundM: number;
  medianGroundM: number;
  /**
   * GSD in cm/px of every site cell some photo sees, in cell order (only its distribution
   * is shown). Made again from the ground heights on each call (a bit per cell is kept,
   * not the values), so the figures do not hold memory through the outputs.
   */
  gsdValuesCm: () => Float32Array;
  /** The report's histogram of those values on the given bin edges (report/histogram.ts), without the array: read off gsdTally when the edges fall on its grid. */
  gsdHistogram: (edgesCm: number[]) => Histogram;
  /** Those values tallied in the comparison's pass (BaselineOptions.gsdTally), if asked for. */
  gsdTally?: GsdTally;
  stats: {
    gsdCm: GsdStats;
    withinBandPct: number;
    images: { min: number; median: number };
    flaggedAreaM2: number;
    flaggedPct: number;
    /** Flagged site cells by flag key, as the assessment's stats.flagged.byKind. */
    flaggedByKind: Record<string, { cells: number; areaM2: number; pct: number }>;
    ceilingBreaches: CeilingBreaches;
  };
  /** Our plan's site cells above the ceiling by the same measure (expected none; ceilingBreaches counts alike). */
  planCeilingBreaches: CeilingBreaches;
  /** Site cells where the one altitude leaves less than the plan's clearance above the ground straight below; undefined without site ground. */
  clearanceShortfall?: ClearanceShortfall;
}

/**
 * Site cells where a constant altitude leaves less than `clearanceM` above the DEM ground
 * straight below (a simpler measure than the solver's safety disc, enough to show that one
 * altitude cannot clear the high ground), and the highest site ground.
 */
export interface ClearanceShortfall {
  clearanceM: number;
  cells: number;
  areaM2: number;
  maxGroundM: number;
}

export interface BaselineOptions {
  targetHeightM: number;
  triggerM: number;
  minImages: number;
  ceiling: { heightM: number; reference: CeilingReference };
  takeoffGroundM: number;
  /** The plan's clearance floor (minimum + obstacle margin + DEM accuracy): the comparison's clearance shortfall is counted against it. */
  clearanceM: number;
  /** The terrain-following plan's rasters: its site mask and GSD give its own breaches. */
  planRasters: AssessmentRasters;
  /** Threads the plan may use (1: the comparison in no worker thread; see baselineBackground.ts); default the machine's choice. */
  threads?: number;
  /** Also tally the seen cells' GSD on this grid in the comparison's pass, so gsdHistogram is read off it when its edges fall on the grid. */
  gsdTally?: GsdTallyGrid;
}

/**
 * Measures the constant-altitude plan over the layout's strips.
 * @example constantAltitudeBaseline(grid, layout, camera, req, { targetHeightM: 91, ... }).stats.withinBandPct
 */
export function constantAltitudeBaseline(
  grid: DemGrid,
  layout: Layout,
  camera: Camera,
  requirement: Requirement,
  o: BaselineOptions,
): Baseline {
  const job = baselineJob(grid, layout, camera, requirement, o, o.planRasters.inSite);
  return baselineOf(grid, camera, o, baselineFigures(job), o.planRasters);
}

/**
 * Everything the comparison's own figures need, as plain data and typed arrays, so a
 * worker thread can make them (baselineBackground.ts) while the plan is still assessed.
 */
export interface BaselineJob {
  grid: Pick<DemGrid, "width" | "height" | "heights" | "transform" | "cellSizeM">;
  inSite: Uint8Array;
  strips: LatticeStrip[];
  ifov: number;
  /** Half footprint per metre of height, along and across the strip (ifov * pixels / 2). */
  kAlong: number;
  kAcross: number;
  lowGsdM: number;
  highGsdM: number;
  targetHeightM: number;
  triggerM: number;
  minImages: number;
  ceiling: BaselineOptions["ceiling"];
  takeoffGroundM: number;
  clearanceM: number;
  gsdTally?: GsdTallyGrid;
  /** "js": count and tally with the JavaScript rows even where the WebAssembly ones are built (the tests that compare them); the same figures. */
  rowsIn?: "wasm" | "js";
}

/** The comparison's figures, before the plan's own rasters are there to compare. */
export interface BaselineFigures {
  altitudeAmslM: number;
  medianGroundM: number;
  stats: Baseline["stats"];
  clearanceShortfall?: ClearanceShortfall;
  /** A bit per cell: site cells some photo sees (cell order), and how many. */
  seenBits: Uint8Array;
  seen: number;
  /** The seen cells' GSD on the job's tally grid, if it had one. */
  gsdTally?: GsdTally;
}

/**
 * The job for a layout: the strips' photo lattices, as the assessment places photos.
 * @example baselineFigures(baselineJob(grid, layout, camera, req, o, inSite))
 */
export function baselineJob(
  grid: BaselineJob["grid"],
  layout: Layout,
  camera: Camera,
  requirement: Pick<Requirement, "lowGsdM" | "highGsdM">,
  o: Omit<BaselineOptions, "planRasters" | "threads">,
  inSite: Uint8Array,
): BaselineJob {
  const strips: LatticeStrip[] = [];
  for (const l of layout.legs) {
    if (l.kind !== "strip") continue;
    // Photos every trigger distance from each strip's start (or on the line's own photo grid
    // where a block seam cut it), as the assessment places them on the flown strips.
    const leg = {
      kind: l.kind, from: l.from, to: l.to,
      ...(l.noPhotoIntervals ? { noPhotoIntervals: l.noPhotoIntervals } : {}),
      ...(l.photoGrid ? { photoPhaseM: photoPhaseOn(l.photoGrid, 0) } : {}),
    };
    const lattice = photoLattice(leg, o.triggerM);
    if (lattice) strips.push({ from: l.from, lattice });
  }
  const { alongPx, acrossPx } = footprintPixels(camera);
  const { width, height, heights, transform, cellSizeM } = grid;
  return {
    grid: { width, height, heights, transform, cellSizeM },
    inSite, strips,
    ifov: camera.ifov, kAlong: (camera.ifov * alongPx) / 2, kAcross: (camera.ifov * acrossPx) / 2,
    lowGsdM: requirement.lowGsdM, highGsdM: requirement.highGsdM,
    targetHeightM: o.targetHeightM, triggerM: o.triggerM, minImages: o.minImages, ceiling: o.ceiling, takeoffGroundM: o.takeoffGroundM,
    clearanceM: o.clearanceM,
    ...(o.gsdTally ? { gsdTally: o.gsdTally } : {}),
  };
}

/**
 * The comparison's figures from its job, on this thread: the altitude over the site's median
 * ground, then the image counts from the photo lattices a band of rows at a time, each band's
 * read at once by one pass over the site for the rest (a worker thread makes them beside the
 * plan: baselineBackground.ts).
 * @example const f = baselineFigures(job); f.stats.withinBandPct
 */
export function baselineFigures(job: BaselineJob): BaselineFigures {
  const { grid, inSite } = job;
  const ground = siteGround(grid.heights, inSite, grid.width, grid.height);
  const medianGroundM = medianOfSiteGround(grid.heights, inSite, ground);
  const A = medianGroundM + job.targetHeightM;
  const lattice = latticeCountsByBand(grid, inSite, job.strips, A, job.triggerM, job.kAlong, job.kAcross, { blocks: ground.blocks, rowsIn: job.rowsIn, tally: { bins: job.gsdTally?.bins ?? 0 } });
  const images = lattice.images;

  // One pass over the site, band by band as the counts are made: GSD, flags (the
  // assessment's effect bits), every count, the clearance shortfall and the first radix pass
  // of the GSD quantiles (below).
  const n = inSite.length;
  const t: SiteTallies = {
    counts: new Float64Array(TALLY_COUNTS),
    seenBits: zeroFilled(new Uint8Array((n + 7) >> 3)),
    imageHist: zeroFilled(new Float64Array(65536)),
    flagHist: zeroFilled(new Float64Array(FLAG_VALUES)),
    seenGround: zeroFilled(new Uint32Array(RADIX_BINS)),
    tallySlots: job.gsdTally ? zeroFilled(new Float64Array(job.gsdTally.bins + 2)) : undefined,
  };
  t.counts[MAX_GROUND] = -Infinity;
  const k = tallyConstants(job, A, t);
  const kernel = lattice.tallies;
  // With the WebAssembly rows the pass runs there too, on the band it holds (latticeRows.as.ts
  // tallyBand, tallyRow's twin), its tallies read out at the end.
  if (kernel) {
    if (job.gsdTally) kernel.edges.set(tallyEdges(job.gsdTally));
    kernel.setup(A, k.gsdPerM, k.lo, k.hi, k.clearanceM, k.minImages, k.breachGsd !== undefined, k.breachGsd ?? NaN, job.ifov, job.takeoffGroundM + job.ceiling.heightM + 0.01);
  }
  for (let band = 0; band < lattice.bands; band++) {
    const [i0, i1] = lattice.count(band);
    // Row by row: a call the engine runs often is soon compiled by its optimising tier (a long
    // first call would run in its baseline tier throughout).
    for (let r = i0; r < i1; r += grid.width) {
      if (kernel) kernel.band(r - i0, Math.min(i1, r + grid.width) - i0, i0);
      else tallyRow(k, t, images, r, Math.min(i1, r + grid.width), i0);
    }
  }
  if (kernel) {
    t.seenBits.set(kernel.seenBits);
    t.imageHist.set(kernel.imageHist);
    t.flagHist.set(kernel.flagHist);
    t.seenGround.set(kernel.seenGround);
    if (t.tallySlots) t.tallySlots.set(kernel.slots);
    for (const [at, c] of [[SITE_CELLS, 0], [SEEN, 1], [SEEN_WITH_GROUND, 2], [IN_BAND, 3], [BREACHES, 4], [SHORT_CELLS, 5], [MAX_GROUND, 6]]) t.counts[at] = kernel.count(c);
  }
  const { counts, seenBits, imageHist, flagHist, seenGround } = t;
  const seen = counts[SEEN];
  const siteCells = counts[SITE_CELLS];
  const inBand = counts[IN_BAND];
  const breaches = counts[BREACHES];
  const shortCells = counts[SHORT_CELLS];
  const maxGroundM = counts[MAX_GROUND];
  const seenWithGround = counts[SEEN_WITH_GROUND];
  const { heights } = grid;
  const gsdPerM = job.ifov * 100;
  const clearanceM = job.clearanceM;
  const kindCells = new Float64Array(ASSESSMENT_FLAG_KINDS.length);
  let flagged = 0;
  // Kinds read off the histogram of flag values rather than bit by bit per cell.
  for (let f = 1; f < FLAG_VALUES; f++) {
    if (flagHist[f] === 0) continue;
    flagged += flagHist[f];
    for (let j = 0; j < ASSESSMENT_FLAG_KINDS.length; j++) if (f & ASSESSMENT_FLAG_KINDS[j].bit) kindCells[j] += flagHist[f];
  }
  // GSD falls as the ground rises (and its float32 rounding keeps that order), so the r-th
  // smallest GSD is that of the (m - 1 - r)-th lowest seen ground: no array of GSD values.
  const QS = [0, 0.05, 0.5, 0.95, 1];
  const zs = orderStatisticsOfRadix(heights, { hist: seenGround, n: seenWithGround }, (m) => ranksOf(m, QS).map((r) => m - 1 - r), { bits: seenBits }, ground.bins);
  const [min, p5, median, p95, max] = zs.n === 0 ? QS.map(() => NaN) : interpolate(zs.n, QS, zs.stats.map((g) => Math.fround((A - g) * gsdPerM)));
  const cellAreaM2 = grid.cellSizeM[0] * grid.cellSizeM[1];
  const pct = (part: number) => (siteCells > 0 ? (100 * part) / siteCells : 0);
  const flaggedByKind: Baseline["stats"]["flaggedByKind"] = {};
  ASSESSMENT_FLAG_KINDS.forEach((kind, j) => {
    flaggedByKind[kind.key] = { cells: kindCells[j], areaM2: kindCells[j] * cellAreaM2, pct: pct(kindCells[j]) };
  });
  return {
    altitudeAmslM: A,
    medianGroundM,
    ...(Number.isFinite(maxGroundM) ? { clearanceShortfall: { clearanceM, cells: shortCells, areaM2: shortCells * cellAreaM2, maxGroundM } } : {}),
    seenBits,
    seen,
    ...(job.gsdTally && t.tallySlots ? { gsdTally: tallyOfSlots(job.gsdTally, t.tallySlots) } : {}),
    stats: {
      gsdCm: { min, p5, median, p95, max },
      withinBandPct: pct(inBand),
      images: countStatsOfHistogram(imageHist),
      flaggedAreaM2: flagged * cellAreaM2,
      flaggedPct: pct(flagged),
      flaggedByKind,
      ceilingBreaches: { cells: breaches, areaM2: breaches * cellAreaM2 },
    },
  };
}

/** The comparison pass's tallies across bands: counts (indices below) and histograms. */
interface SiteTallies {
  counts: Float64Array;
  /** A bit per cell: site cells some photo sees. */
  seenBits: Uint8Array;
  imageHist: Float64Array;
  flagHist: Float64Array;
  /** First radix pass of the seen cells' ground (quantiles.ts). */
  seenGround: Uint32Array;
  tallySlots?: Float64Array;
}
const SEEN = 0, SEEN_WITH_GROUND = 1, SITE_CELLS = 2, IN_BAND = 3, BREACHES = 4, SHORT_CELLS = 5, MAX_GROUND = 6, TALLY_COUNTS = 7;

/** What the comparison's pass reads besides the cells: its constants, made once (tallyConstants). */
interface TallyConstants {
  job: BaselineJob;
  inSite: Uint8Array;
  heights: Float32Array;
  heightBits: Uint32Array;
  A: number;
  gsdPerM: number;
  /** The detail band's ends with their slack, cm/px. */
  lo: number;
  hi: number;
  clearanceM: number;
  minImages: number;
  /** Under the ground and surface rules a breach is a GSD at or above one threshold (ceilingBreachGsdCm). */
  breachGsd: number | undefined;
  tally: BinCounter | undefined;
}

function tallyConstants(job: BaselineJob, A: number, t: SiteTallies): TallyConstants {
  return {
    job, inSite: job.inSite, heights: job.grid.heights, heightBits: float32Keys(job.grid.heights), A, gsdPerM: job.ifov * 100,
    lo: job.lowGsdM * 100 * (1 - BAND_SLACK), hi: job.highGsdM * 100 * (1 + BAND_SLACK),
    clearanceM: job.clearanceM, minImages: job.minImages, breachGsd: ceilingBreachGsdCm(job.ifov, job),
    tally: job.gsdTally && t.tallySlots ? tallyCounter(job.gsdTally, t.tallySlots, 0) : undefined,
  };
}

/**
 * The comparison's pass over cells i0 .. i1 - 1 (one row; cell i's image count is
 * images[i - imagesAt]), added to `t`. A small function of its own, called row by row, so the
 * engine compiles it whole after its first calls, the code after its loop included (a loop
 * compiled mid-call, as it was when this ran band by band inside baselineFigures, was sent
 * back to the interpreter by each piece of code after it first reached: node --trace-opt).
 * The row's counts are kept in locals and added to `t` at its end, and the histograms of
 * values that neighbouring cells share (the seen ground's radix bins, the image counts, the
 * flag values, the seen cells' bits) are added a run of equal values at a time: an entry
 * incremented cell after cell makes each increment wait for the one before (~5 cycles each).
 * The counts that data decide (cells short of clearance, in the band, above the ceiling) add 0
 * or 1 on every cell rather than being incremented in a branch first taken late in the pass.
 */
function tallyRow(k: TallyConstants, t: SiteTallies, images: Uint16Array, i0: number, i1: number, imagesAt: number): void {
  const { inSite, heights, heightBits, A, gsdPerM, lo, hi, clearanceM, minImages, breachGsd, tally, job } = k;
  const { counts, seenBits, imageHist, flagHist, seenGround } = t;
  let siteCells = 0, seen = 0, seenWithGround = 0, inBand = 0, breaches = 0, shortCells = 0;
  let maxGround = counts[MAX_GROUND];
  // Runs of one value: the seen ground's radix bin, the image count, the flag value; the
  // byte of seen bits being filled.
  let groundBin = 0, groundRun = 0;
  let imagesOf = 0, imagesRun = 0;
  let flagOf = 0, flagRun = 0;
  let byteAt = i0 >> 3, byte = 0;
  for (let i = i0; i < i1; i++) {
    if (inSite[i] === 0) continue;
    siteCells++;
    const c = images[i - imagesAt];
    const z = heights[i];
    // The GSD of a seen cell (made once: the flags and the report's histogram both use it).
    const g = c > 0 ? Math.fround((A - z) * gsdPerM) : NaN;
    // NaN (nodata) ground fails both comparisons.
    if (z > maxGround) maxGround = z;
    shortCells += A - z < clearanceM ? 1 : 0;
    if (c > 0) {
      seen++;
      if (i >> 3 !== byteAt) {
        seenBits[byteAt] |= byte;
        byteAt = i >> 3;
        byte = 0;
      }
      byte |= 1 << (i & 7);
      // NaN ground is left out, as orderStatistics leaves it out.
      if (z === z) {
        const bin = radixBin(heightBits[i]);
        if (bin === groundBin) groundRun++;
        else {
          seenGround[groundBin] += groundRun;
          groundBin = bin;
          groundRun = 1;
        }
        seenWithGround++;
      }
      // The GSD as the report's histogram of the comparison counts it (baselineOf, seenGsdChunks).
      if (tally !== undefined) tally.add(g);
    }
    let f: number;
    if (z !== z) f = FLAG_NODATA;
    else {
      if (c === imagesOf) imagesRun++;
      else {
        imageHist[imagesOf] += imagesRun;
        imagesOf = c;
        imagesRun = 1;
      }
      f = c < minImages ? FLAG_FEW_IMAGES : 0;
      if (c > 0) {
        // NaN GSD counts as in the band, as the assessment counts it.
        const coarse = g > hi;
        const fine = !coarse && g < lo;
        f |= (coarse ? FLAG_COARSE : 0) | (fine ? FLAG_FINE : 0);
        inBand += coarse || fine ? 0 : 1;
        breaches += (breachGsd !== undefined ? g >= breachGsd : overCeiling(g, z, job.ifov, job)) ? 1 : 0;
      }
    }
    if (f === flagOf) flagRun++;
    else {
      flagHist[flagOf] += flagRun;
      flagOf = f;
      flagRun = 1;
    }
  }
  seenBits[byteAt] |= byte;
  seenGround[groundBin] += groundRun;
  imageHist[imagesOf] += imagesRun;
  flagHist[flagOf] += flagRun;
  counts[SITE_CELLS] += siteCells;
  counts[SEEN] += seen;
  counts[SEEN_WITH_GROUND] += seenWithGround;
  counts[IN_BAND] += inBand;
  counts[BREACHES] += breaches;
  counts[SHORT_CELLS] += shortCells;
  counts[MAX_GROUND] = maxGround;
}

/**
 * The Baseline from its figures and the plan's rasters (the plan's own ceiling breaches, or
 * their count when the assessment made it: see ceilingBreachGsdCm).
 * @example baselineOf(grid, camera, o, baselineFigures(job), assessment.rasters)
 */
export function baselineOf(
  grid: DemGrid,
  camera: Camera,
  o: Pick<BaselineOptions, "targetHeightM" | "ceiling" | "takeoffGroundM">,
  f: BaselineFigures,
  planRasters: AssessmentRasters,
  planBreachCells?: number,
): Baseline {
  const A = f.altitudeAmslM;
  const { heights } = grid;
  const gsdPerM = camera.ifov * 100;
  const { seenBits, seen } = f;
  const n = heights.length;
  /** The seen cells' GSD, made chunk by chunk into `each` (cell order). */
  const seenGsdChunks = (each: (chunk: Float32Array) => void): void => {
    const chunk = new Float32Array(Math.min(seen, 1 << 16));
    let k = 0;
    for (let i = 0; i < n; i++) {
      if ((seenBits[i >> 3] & (1 << (i & 7))) === 0) continue;
      chunk[k++] = (A - heights[i]) * gsdPerM;
      if (k === chunk.length) {
        each(chunk);
        k = 0;
      }
    }
    if (k > 0) each(chunk.subarray(0, k));
  };
  return {
    altitudeAmslM: A,
    heightAboveMedianGroundM: o.targetHeightM,
    medianGroundM: f.medianGroundM,
    gsdValuesCm: () => {
      const out = new Float32Array(seen);
      let j = 0;
      seenGsdChunks((chunk) => {
        out.set(chunk, j);
        j += chunk.length;
      });
      return out;
    },
    gsdHistogram: (edgesCm) => {
      const read = histogramOfTally(f.gsdTally, edgesCm);
      if (read) return read;
      const counter = histogramCounter(edgesCm);
      seenGsdChunks((chunk) => counter.add(chunk, null));
      return counter.result();
    },
    ...(f.gsdTally ? { gsdTally: f.gsdTally } : {}),
    stats: f.stats,
    planCeilingBreaches: planBreachCells === undefined ? ceilingBreaches(grid, planRasters, camera, o) : breachesOf(grid, planBreachCells),
    ...(f.clearanceShortfall ? { clearanceShortfall: f.clearanceShortfall } : {}),
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
  let cells = 0;
  for (let i = 0; i < r.gsdCm.length; i++) {
    if (!r.inSite[i]) continue;
    const g = r.gsdCm[i];
    if (g > 0 && overCeiling(g, grid.heights[i], camera.ifov, o)) cells++;
  }
  return breachesOf(grid, cells);
}

function breachesOf(grid: Pick<DemGrid, "cellSizeM">, cells: number): CeilingBreaches {
  return { cells, areaM2: cells * grid.cellSizeM[0] * grid.cellSizeM[1] };
}

/**
 * Under the `ground` and `surface` rules a cell's breach depends on its GSD alone (the camera
 * height H = GSD / ifov against the ceiling): the smallest Float32 GSD in cm/px that
 * ceilingBreaches counts, so that `GSD >= it` counts the same cells (the test is monotone in
 * the GSD; found by stepping Float32 values from an estimate). Undefined under `takeoff`,
 * where the ground below matters too.
 * @example const t = ceilingBreachGsdCm(camera.ifov, o); // count site cells with gsdCm >= t
 */
export function ceilingBreachGsdCm(ifov: number, o: Pick<BaselineOptions, "ceiling" | "takeoffGroundM">): number | undefined {
  if (o.ceiling.reference === "takeoff") return undefined;
  const over = (g: number) => overCeiling(g, 0, ifov, o);
  const g = new Float32Array(1);
  const bits = new Uint32Array(g.buffer);
  // Positive Float32 values order like their bit patterns.
  g[0] = Math.max(Math.fround((o.ceiling.heightM + 0.01) * 100 * ifov), 1e-45);
  while (!over(g[0]) && g[0] < Infinity) bits[0]++;
  while (bits[0] > 1) {
    bits[0]--;
    if (!over(g[0])) {
      bits[0]++;
      break;
    }
  }
  return g[0];
}

/** Whether a photo giving GSD g (cm/px) over ground z was above the ceiling (1 cm of slack: heights rebuilt from Float32 GSD). */
function overCeiling(gsdCm: number, groundM: number, ifov: number, o: Pick<BaselineOptions, "ceiling" | "takeoffGroundM">): boolean {
  const hM = gsdCm / 100 / ifov;
  return o.ceiling.reference === "takeoff" ? groundM + hM > o.takeoffGroundM + o.ceiling.heightM + 0.01 : hM > o.ceiling.heightM + 0.01;
}
