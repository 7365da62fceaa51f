import { inBackground, inSharedMemory } from "../background.js";
import type { ReportInput } from "./model.js";
import { renderReport } from "./render.js";
import { serializeReportInput } from "./serialize.js";
import type { DemLayers } from "./demLayers.js";

const workerUrl = new URL("./renderWorker.js", import.meta.url);

/** The report's two files from one input, made on a worker thread when one could be started. */
export interface ReportFilesInBackground {
  /** report.html's UTF-8 bytes. */
  bytes: () => Promise<Uint8Array>;
  /** report.html as text. */
  html: () => Promise<string>;
  /** report-data.json's UTF-8 bytes (serializeReportInput's text). */
  data: () => Promise<Uint8Array>;
}

/**
 * Starts rendering report.html from `input` in a worker thread (when the compiled worker is
 * there: the built library, dist/), so the caller can write other files meanwhile; otherwise,
 * or if the worker fails, the page is rendered on this thread when awaited. The same worker
 * then writes report-data.json's text from the same input (serializeReportInput), taking its
 * zlib work (~0.15 s at 4 km2) off the calling thread, which otherwise made it last and alone
 * while the other core had finished its share of the files. The input's typed arrays are
 * shared with the worker (inSharedMemory: one copy of their values), the rest copied; both
 * files come back as UTF-8 bytes (`bytes` and `data`; the page also as text, `html`). Never
 * rejects before it is awaited: a failure surfaces from the file asked for. `layers`: the
 * DEM's layers made beforehand (demLayers.ts), if any.
 * @example const files = reportFilesInBackground(compact); ...; await writeFile("report.html", await files.bytes());
 */
export function reportFilesInBackground(input: ReportInput, layers?: DemLayers): ReportFilesInBackground {
  const made = inBackground<{ page: Uint8Array; data: Uint8Array }>(workerUrl, inSharedMemory({ input, layers }));
  const fromWorker = async () => made.result();
  const bytes = async () => (await fromWorker())?.page ?? new TextEncoder().encode(renderReport(input, layers));
  const data = async () => (await fromWorker())?.data ?? new TextEncoder().encode(serializeReportInput(input));
  return { bytes, html: async () => new TextDecoder().decode(await bytes()), data };
}
