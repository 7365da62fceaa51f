/**
 * Plans one site of a campaign into its folder: the same job as `gsdplan plan`
 * (planToFolder), with the inputs hash added to summary.json. Runs in a worker
 * thread (siteWorker.ts) or, without a built worker, on the calling thread.
 */
import { isUserError } from "../errors.js";
import { planToFolder } from "../cli/planCommand.js";
import type { OutputFile } from "../export/atomicDir.js";
import { figuresFromSummary, withInputsHash } from "./figures.js";
import type { SiteFigures, SiteJob, SiteStage } from "./types.js";

/**
 * Plans `job` and writes its output set (replacing outputs that are not current).
 * @example const figures = await planSite(job, (stage) => console.log(stage));
 */
export async function planSite(job: SiteJob, onStage: (stage: SiteStage) => void): Promise<SiteFigures> {
  const summary = await planToFolder(job.options, {
    outDir: job.outDir,
    force: true,
    planFile: job.planFile,
    onStage,
    // Sites already run in parallel, one per worker: each site's coverage pass keeps to one thread.
    threads: 1,
    amendFiles: (files) => files.map((f) => (f.name === "summary.json" ? hashed(f, job.inputsHash) : f)),
  });
  return figuresFromSummary(summary);
}

function hashed(f: OutputFile, hash: string): OutputFile {
  const data = f.data;
  const text = async () => {
    const d = typeof data === "function" ? await data() : data;
    if (typeof d === "string") return d;
    if (d instanceof ArrayBuffer || d instanceof Uint8Array) return new TextDecoder().decode(d);
    return Buffer.concat([...d]).toString("utf8");
  };
  return { name: f.name, data: async () => withInputsHash(await text(), hash) };
}

/**
 * A failure as one line for campaign.csv: the message of an error the user can fix
 * (several problems joined by "; "), or "internal error: ..." for anything else.
 * @example errorLine(new InputFileError("dem.tif", "not a TIFF file")) // "dem.tif: not a TIFF file"
 */
export function errorLine(e: unknown): string {
  const message = e instanceof Error ? e.message : String(e);
  const line = message.split(/\r?\n/).map((l) => l.trim()).filter(Boolean).join("; ");
  return isUserError(e) ? line : `internal error: ${line}`;
}
