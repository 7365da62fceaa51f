import { inBackground } from "../background.js";
import type { ReportInput } from "./model.js";
import { renderReport } from "./render.js";
import type { DemLayers } from "./demLayers.js";

const workerUrl = new URL("./renderWorker.js", import.meta.url);

/**
 * Starts rendering report.html from `input` in a worker thread (when the compiled worker is
 * there: the built library, dist/), so the caller can write other files meanwhile; otherwise,
 * or if the worker fails, the page is rendered on this thread when awaited. The input is
 * copied to the worker (a compacted input is a few megabytes). Never rejects before it is
 * awaited: a failure surfaces from `html()`. `layers`: the DEM's layers made beforehand (demLayers.ts), if any.
 * @example const page = reportHtmlInBackground(compact); ...; await writeFile("report.html", await page.html());
 */
export function reportHtmlInBackground(input: ReportInput, layers?: DemLayers): { html: () => Promise<string> } {
  const page = inBackground<string>(workerUrl, { input, layers });
  return { html: async () => (await page.result()) ?? renderReport(input, layers) };
}
