import { inBackground, inSharedMemory } from "../background.js";
import type { ReportInput } from "./model.js";
import { renderReport } from "./render.js";
import { serializeReportInputInPool } from "./serialize.js";
import type { DemLayers } from "./demLayers.js";

const workerUrl = new URL("./renderWorker.js", import.meta.url);

/** The report's two files from one input, made on a worker thread when one could be started. */
export interface ReportFilesInBackground {
  /** report.html's UTF-8 bytes. */
  bytes: () => Promise<Uint8Array>;
  /** report.html as text. */
  html: () => Promise<string>;
  /** report-data.json's UTF-8 bytes (serializeReportInput's text, its streams deflated on Node's thread pool). */
  data: () => Promise<Uint8Array>;
}

/**
 * Who makes report-data.json, decided once (compare-and-exchange on a shared flag): the page's
 * worker when it is done with the page before this thread asks for the file, else this thread.
 */
export const DATA_UNCLAIMED = 0;
export const DATA_BY_WORKER = 1;
export const DATA_BY_CALLER = 2;

/**
 * Starts rendering report.html from `input` in a worker thread (when the compiled worker is
 * there: the built library, dist/), so the caller can write other files meanwhile; otherwise,
 * or if the worker fails, the page is rendered on this thread when awaited. report-data.json's
 * text (serializeReportInputInPool, ~0.06 s at 4 km2) goes to whichever thread is free
 * first: the worker once the page is done, unless this thread asked for the file before
 * that (it then makes it itself, while the worker finishes the page). This thread made it
 * last and alone when the worker had finished early (the oblique 3.2 km2 site); the worker
 * did, when this thread had (4 km2). The input's typed arrays are shared with the worker
 * (inSharedMemory: one copy of their values), the rest copied; both files come back as UTF-8
 * bytes (`bytes` and `data`; the page also as text, `html`). Never rejects before it is
 * awaited: a failure surfaces from the file asked for. `layers`: the DEM's layers made
 * beforehand (demLayers.ts), if any.
 * @example const files = reportFilesInBackground(compact); ...; await writeFile("report.html", await files.bytes());
 */
export function reportFilesInBackground(input: ReportInput, layers?: DemLayers): ReportFilesInBackground {
  const claim = new Int32Array(new SharedArrayBuffer(4));
  const made = inBackground<{ page: Uint8Array; data?: Uint8Array }>(workerUrl, { ...inSharedMemory({ input, layers }), claim });
  const bytes = async () => (await made.result())?.page ?? new TextEncoder().encode(renderReport(input, layers));
  const data = async () => {
    // Claimed here first, or the worker's (here too should the worker fail).
    const byWorker = Atomics.compareExchange(claim, 0, DATA_UNCLAIMED, DATA_BY_CALLER) !== DATA_UNCLAIMED;
    return (byWorker ? (await made.result())?.data : undefined) ?? new TextEncoder().encode(await serializeReportInputInPool(input));
  };
  return { bytes, html: async () => new TextDecoder().decode(await bytes()), data };
}
