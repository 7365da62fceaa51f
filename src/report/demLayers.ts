import { existsSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { Worker } from "node:worker_threads";
import type { ReportGrid } from "./model.js";
import { blockFactor, downsampleGrid } from "./downsample.js";
import { hillshade } from "./hillshade.js";
import { pngDataUri, shadeRgba } from "./png.js";
import { contourLayer, mapView } from "./map.js";

/**
 * The report's layers that come from the DEM alone: the hill shade (a PNG data URI) and the
 * main map's contours. They take a good share of the page's rendering, and the DEM is known
 * from the start of a plan, so a plan has them made on a worker thread while it lays out and
 * solves (demLayersInBackground); the page is the same whether they were made then or by
 * renderReport itself (test/report/background.test.ts).
 */
export interface DemLayers {
  /** Which reduced DEM they were drawn from (size and geotransform; see demLayersKey). */
  key: string;
  shadeUri: string;
  contours: { svg: string; labels: string; intervalM: number };
}

/**
 * The layers of the reduced DEM the page draws (the report input's DEM after compactReportInput).
 * @example const layers = demLayers(compactReportInput(input).dem)
 */
export function demLayers(dem: ReportGrid): DemLayers {
  return {
    key: demLayersKey(dem),
    shadeUri: pngDataUri(dem.width, dem.height, shadeRgba(hillshade().azimuth(315).altitude(45).zFactor(1)(dem))),
    contours: contourLayer(mapView(dem, 1000), dem),
  };
}

/** A reduced DEM's size and geotransform: layers are used only for the DEM they were drawn from. */
export function demLayersKey(dem: ReportGrid): string {
  const t = dem.transform;
  return `${dem.width}x${dem.height} ${t.x0} ${t.y0} ${t.dx} ${t.dy}`;
}

/**
 * The layers of a full-resolution DEM, reduced to at most `maxPx` across as the report
 * input is (compactReportInput).
 * @example demLayersOfGrid(run.grid).contours.intervalM
 */
export function demLayersOfGrid(grid: ReportGrid, maxPx = 1000): DemLayers {
  return demLayers(downsampleGrid(grid, blockFactor(grid.width, grid.height, maxPx)));
}

const workerUrl = new URL("./demLayersWorker.js", import.meta.url);

/** Below this many cells the layers take a few tens of milliseconds: no thread is started for them. */
const MIN_CELLS_FOR_WORKER = 250_000;

/**
 * Starts making the DEM layers on a worker thread (heights in shared memory are read in
 * place). `layers()` gives them, or undefined when no worker was started (one thread
 * requested, a small DEM, the compiled worker missing: it runs from the built library,
 * dist/) or it failed: the page then draws them itself. The worker does not keep the
 * process alive until `layers()` is called.
 * @example const pending = demLayersInBackground(grid); ...; renderReport(input, await pending.layers())
 */
export function demLayersInBackground(grid: ReportGrid, threads?: number): { layers: () => Promise<DemLayers | undefined> } {
  if (threads === 1 || grid.width * grid.height < MIN_CELLS_FOR_WORKER || !existsSync(fileURLToPath(workerUrl))) return { layers: async () => undefined };
  const { width, height, transform, cellSizeM, heights } = grid;
  const w = new Worker(workerUrl, { workerData: { width, height, transform, cellSizeM, heights } satisfies ReportGrid });
  w.unref();
  const made = new Promise<DemLayers | undefined>((resolve) => {
    w.once("message", (m: DemLayers) => {
      resolve(m);
      void w.terminate();
    });
    w.once("error", () => resolve(undefined));
    w.once("exit", () => resolve(undefined));
  });
  return {
    layers: () => {
      w.ref();
      return made;
    },
  };
}
