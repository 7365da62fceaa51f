import { backgroundAllowed, inBackground, NOT_IN_BACKGROUND, splitAllowed, type Background } from "../background.js";
import type { DemGrid } from "../dem/grid.js";
import type { Camera, Requirement } from "../camera/types.js";
import type { Layout } from "../layout/types.js";
import type { AssessmentRasters } from "../assess/types.js";
import type { LatticeStrip } from "../assess/latticeCoverage.js";
import { baselineFigures, baselineJob, baselineOf, type Baseline, type BaselineFigures, type BaselineJob, type BaselineOptions } from "./baseline.js";

const workerUrl = new URL("./baselineWorker.js", import.meta.url);

/**
 * Below this many DEM cells no comparison is started before the solve (unless more than one
 * thread is asked for). A worker beside the solve slows it (4 km2: 0.6 -> 0.85 s), which
 * the comparison made meanwhile repays on large grids (the assessment then has both cores:
 * 4 km2 -0.1 s overall, 3.2 km2 oblique -0.5 s); on the demo (2.7 M cells, whose solve flies
 * the strips the other way, so the early figures are not used) it cost 2.16 -> 2.20 s.
 */
export const EARLY_BASELINE_MIN_CELLS = 8_000_000;

/**
 * The nice value of the worker started before the solve (threadPriority.ts): its figures are
 * wanted after the assessment, and beside the solve at the same priority it took CPU from the
 * solve and from V8's compiler threads (4 km2, 6 interleaved pairs: solve median 0.82 ->
 * 0.75 s, wall 5.27 -> 5.17 s). Started at the route stage it keeps the process's priority:
 * the plan waits for it right after the assessment.
 */
const EARLY_BASELINE_NICE = 10;

/** The comparison started on a worker thread from the strips as laid out, before the solve. */
export interface EarlyBaseline {
  job: BaselineJob;
  figures: Background<BaselineFigures>;
}

/**
 * Whether the comparison is started before the solve on a grid of `cells`: where a worker
 * may run (backgroundAllowed) and from EARLY_BASELINE_MIN_CELLS, or with more than one
 * thread asked for (splitAllowed). Asked before the job is made, which is then not made.
 * @example const early = earlyBaselineAllowed(n, threads) ? baselineBeforeSolve(baselineJob(...)) : undefined;
 */
export function earlyBaselineAllowed(cells: number, threads?: number): boolean {
  return backgroundAllowed(cells, threads) && splitAllowed(cells, threads, EARLY_BASELINE_MIN_CELLS);
}

/**
 * Starts the constant-altitude comparison's figures on a worker thread from the job of the
 * strips as laid out (baselineJob), before they are solved: the solve runs on this thread
 * alone and leaves the other core idle. The figures depend on the strips' photo lattices
 * (each strip's ends, its photo phase and its stretches without photos), the DEM and the
 * site only; the solve keeps them unless it flies the strips the other way round or finds
 * stretches without photos, and constantAltitudeBaselineInBackground uses these figures only
 * when the final strips are the same (sameBaselineJob). Call it where earlyBaselineAllowed.
 * @example const early = baselineBeforeSolve(baselineJob(grid, laidOut, camera, req, o, inSite)); ...; constantAltitudeBaselineInBackground(grid, solved, camera, req, o, inSite, early)
 */
export function baselineBeforeSolve(job: BaselineJob): EarlyBaseline {
  return { job, figures: inBackground<BaselineFigures>(workerUrl, { job, nice: EARLY_BASELINE_NICE }) };
}

/**
 * Starts the constant-altitude comparison as soon as the strips are final: its figures
 * depend on the layout, the DEM and the site only, so a worker thread makes them while
 * this thread routes, checks and assesses the plan (which leaves the other core idle
 * for much of that time). With `early` (baselineBeforeSolve) for the same job, its worker
 * goes on instead; for another job it is stopped. `finish` adds what needs the plan's own
 * rasters. In this thread instead (when finished) with one thread requested, on small
 * grids, when the compiled worker is missing (worker threads run from the built library,
 * dist/) or when the worker fails. The figures are the same either way
 * (test/plan/baseline.test.ts). `inSite` is the site mask the assessment will use (in
 * shared memory, so the worker reads it in place; the DEM heights are shared already).
 * @example const b = constantAltitudeBaselineInBackground(grid, layout, camera, req, o, inSite); ...; await b.finish(assessment.rasters)
 */
export function constantAltitudeBaselineInBackground(
  grid: DemGrid,
  layout: Layout,
  camera: Camera,
  requirement: Requirement,
  o: Omit<BaselineOptions, "planRasters">,
  inSite: Uint8Array,
  early?: EarlyBaseline,
): { finish: (planRasters: AssessmentRasters, planBreachCells?: number) => Promise<Baseline>; madeIn: () => "worker" | "this thread" | "pending"; startedBeforeSolve: boolean } {
  const job = baselineJob(grid, layout, camera, requirement, o, inSite);
  const startedBeforeSolve = early !== undefined && sameBaselineJob(early.job, job);
  if (early && !startedBeforeSolve) early.figures.cancel();
  const figures = startedBeforeSolve ? early.figures : backgroundAllowed(grid.width * grid.height, o.threads) ? inBackground<BaselineFigures>(workerUrl, { job }) : NOT_IN_BACKGROUND;
  let madeIn: "worker" | "this thread" | "pending" = "pending";
  return {
    finish: async (planRasters, planBreachCells) => {
      const fromWorker = await figures.result();
      madeIn = fromWorker ? "worker" : "this thread";
      return baselineOf(grid, camera, o, fromWorker ?? baselineFigures(job), planRasters, planBreachCells);
    },
    madeIn: () => madeIn,
    startedBeforeSolve,
  };
}

/**
 * Whether two jobs give the same figures: the same DEM and site mask (the same arrays),
 * the same numbers, and the same photo lattices in any order (each strip's image counts are
 * added cell by cell, whole numbers, so the order of the strips does not change them).
 * @example sameBaselineJob(early.job, baselineJob(grid, solvedLayout, camera, req, o, inSite))
 */
export function sameBaselineJob(a: BaselineJob, b: BaselineJob): boolean {
  if (a.grid.heights !== b.grid.heights || a.inSite !== b.inSite) return false;
  if (a.grid.width !== b.grid.width || a.grid.height !== b.grid.height) return false;
  const ta = a.grid.transform, tb = b.grid.transform;
  if (ta.x0 !== tb.x0 || ta.y0 !== tb.y0 || ta.dx !== tb.dx || ta.dy !== tb.dy) return false;
  if (a.grid.cellSizeM[0] !== b.grid.cellSizeM[0] || a.grid.cellSizeM[1] !== b.grid.cellSizeM[1]) return false;
  const numbers = ["ifov", "kAlong", "kAcross", "lowGsdM", "highGsdM", "targetHeightM", "triggerM", "minImages", "takeoffGroundM", "clearanceM"] as const;
  if (numbers.some((k) => !Object.is(a[k], b[k]))) return false;
  if (a.ceiling.heightM !== b.ceiling.heightM || a.ceiling.reference !== b.ceiling.reference) return false;
  const ga = a.gsdTally, gb = b.gsdTally;
  if ((ga === undefined) !== (gb === undefined) || (ga && gb && (ga.first !== gb.first || ga.stepCm !== gb.stepCm || ga.bins !== gb.bins))) return false;
  if (a.strips.length !== b.strips.length) return false;
  const keys = (strips: readonly LatticeStrip[]) => strips.map(stripKey).sort();
  const ka = keys(a.strips), kb = keys(b.strips);
  return ka.every((k, i) => k === kb[i]);
}

/** A strip's photo lattice as text: every number in full (String of a number reads back exactly). */
function stripKey({ from, lattice: l }: LatticeStrip): string {
  return `${from[0]} ${from[1]} ${l.ux} ${l.uy} ${l.lengthM} ${l.s0} ${l.n} ${l.present.join("")}`;
}
