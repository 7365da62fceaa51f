import { existsSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { Worker } from "node:worker_threads";
import type { DemGrid } from "../dem/grid.js";
import type { Camera, Requirement } from "../camera/types.js";
import type { Layout } from "../layout/types.js";
import type { AssessmentRasters } from "../assess/types.js";
import { baselineFigures, baselineJob, baselineOf, type Baseline, type BaselineFigures, type BaselineOptions } from "./baseline.js";

const workerUrl = new URL("./baselineWorker.js", import.meta.url);

/** Below this many cells the comparison takes a few tens of milliseconds: no thread is started for it. */
const MIN_CELLS_FOR_WORKER = 250_000;

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
 * @example const b = startBaseline(grid, layout, camera, req, o, inSite); ...; await b.finish(assessment.rasters)
 */
export function constantAltitudeBaselineInBackground(
  grid: DemGrid,
  layout: Layout,
  camera: Camera,
  requirement: Requirement,
  o: Omit<BaselineOptions, "planRasters">,
  inSite: Uint8Array,
): { finish: (planRasters: AssessmentRasters) => Promise<Baseline>; madeIn: () => "worker" | "this thread" | "pending" } {
  const job = baselineJob(grid, layout, camera, requirement, o, inSite);
  const here = (): BaselineFigures => baselineFigures(job, o.threads);
  const background = o.threads !== 1 && grid.width * grid.height >= MIN_CELLS_FOR_WORKER && existsSync(fileURLToPath(workerUrl));
  let figures: Promise<BaselineFigures | undefined> = Promise.resolve(undefined);
  let worker: Worker | undefined;
  if (background) {
    const w = new Worker(workerUrl, { workerData: job });
    // Unreferenced until awaited: should the plan fail before then, the process need not wait for it.
    w.unref();
    worker = w;
    figures = new Promise((resolve) => {
      w.once("message", (m: BaselineFigures) => {
        resolve(m);
        void w.terminate();
      });
      // A failed worker leaves the work to this thread.
      w.once("error", () => resolve(undefined));
      w.once("exit", () => resolve(undefined));
    });
  }
  let madeIn: "worker" | "this thread" | "pending" = "pending";
  return {
    finish: async (planRasters) => {
      worker?.ref();
      const fromWorker = await figures;
      madeIn = fromWorker ? "worker" : "this thread";
      return baselineOf(grid, camera, o, fromWorker ?? here(), planRasters);
    },
    madeIn: () => madeIn,
  };
}
