import { inBackground, inSharedMemory } from "../background.js";
import type { ReportInput } from "./model.js";
import { renderReport } from "./render.js";
import type { DemLayers } from "./demLayers.js";

const workerUrl = new URL("./renderWorker.js", import.meta.url);

/**
 * Starts rendering report.html from `input` in a worker thread (when the compiled worker is
 * there: the built library, dist/), so the caller can write other files meanwhile; otherwise,
 * or if the worker fails, the page is rendered on this thread when awaited. The input's
 * typed arrays are shared with the worker (inSharedMemory: one copy of their values, ~26 MB
 * at 4 km2, the strips' profiles most of it), the rest copied; the page comes back as its
 * UTF-8 bytes (`bytes`, what report.html holds) or as text (`html`). Never rejects before it
 * is awaited: a failure surfaces from either. `layers`: the DEM's layers made beforehand
 * (demLayers.ts), if any.
 * @example const page = reportHtmlInBackground(compact); ...; await writeFile("report.html", await page.bytes());
 */
export function reportHtmlInBackground(input: ReportInput, layers?: DemLayers): { bytes: () => Promise<Uint8Array>; html: () => Promise<string> } {
  const page = inBackground<Uint8Array>(workerUrl, inSharedMemory({ input, layers }));
  const bytes = async () => (await page.result()) ?? new TextEncoder().encode(renderReport(input, layers));
  return { bytes, html: async () => new TextDecoder().decode(await bytes()) };
}
