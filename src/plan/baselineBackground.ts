import { backgroundAllowed, inBackground, NOT_IN_BACKGROUND } from "../background.js";
import type { DemGrid } from "../dem/grid.js";
import type { Camera, Requirement } from "../camera/types.js";
import type { Layout } from "../layout/types.js";
import type { AssessmentRasters } from "../assess/types.js";
import { baselineFigures, baselineJob, baselineOf, type Baseline, type BaselineFigures, type BaselineOptions } from "./baseline.js";

const workerUrl = new URL("./baselineWorker.js", import.meta.url);

/**
 * Starts the constant-altitude comparison as soon as the strips are final: its figures
 * depend on the layout, the DEM and the site only, so a worker thread makes them while
 * this thread routes, checks and assesses the plan (which leaves the other core idle
 * for much of that time). `finish` adds what needs the plan's own rasters. In this
 * thread instead (when finished) with one thread requested, on small grids, when the
 * compiled worker is missing (worker threads run from the built library, dist/) or
 * when the worker fails. The figures are the same either way (test/plan/baseline.test.ts).
 * `inSite` is the site mask the assessment will use (in shared memory, so the worker
 * reads it in place; the DEM heights are shared already).
 * @example const b = constantAltitudeBaselineInBackground(grid, layout, camera, req, o, inSite); ...; await b.finish(assessment.rasters)
 */
export function constantAltitudeBaselineInBackground(
  grid: DemGrid,
  layout: Layout,
  camera: Camera,
  requirement: Requirement,
  o: Omit<BaselineOptions, "planRasters">,
  inSite: Uint8Array,
): { finish: (planRasters: AssessmentRasters, planBreachCells?: number) => Promise<Baseline>; madeIn: () => "worker" | "this thread" | "pending" } {
  const job = baselineJob(grid, layout, camera, requirement, o, inSite);
  const figures = backgroundAllowed(grid.width * grid.height, o.threads) ? inBackground<BaselineFigures>(workerUrl, job) : NOT_IN_BACKGROUND;
  let madeIn: "worker" | "this thread" | "pending" = "pending";
  return {
    finish: async (planRasters, planBreachCells) => {
      const fromWorker = await figures.result();
      madeIn = fromWorker ? "worker" : "this thread";
      return baselineOf(grid, camera, o, fromWorker ?? baselineFigures(job, o.threads), planRasters, planBreachCells);
    },
    madeIn: () => madeIn,
  };
}
