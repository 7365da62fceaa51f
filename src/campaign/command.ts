/**
 * The terminal side of `gsdplan campaign`: parses --jobs, drives the progress
 * display, prints one line per site and where index.html is.
 */
import { availableParallelism } from "node:os";
import path from "node:path";
import { InputError } from "../errors.js";
import { campaignProgress } from "./progress.js";
import { runCampaign, type CampaignResult } from "./runCampaign.js";
import { STATUS_TEXT } from "./types.js";

/**
 * Runs the command for commander's parsed options; returns the result (the caller sets the exit code).
 * @example const { failed } = await runCampaignCommand("sites.yaml", { out: "out", jobs: "2" });
 */
export async function runCampaignCommand(
  campaignFile: string,
  opts: { out: string; jobs?: string; force?: boolean; quiet?: boolean },
): Promise<CampaignResult> {
  const jobs = parseJobs(opts.jobs);
  let progress: ReturnType<typeof campaignProgress> | undefined;
  const result = await runCampaign(campaignFile, {
    outDir: opts.out,
    jobs,
    force: Boolean(opts.force),
    onStart: (n) => {
      progress = campaignProgress(process.stderr, Boolean(opts.quiet), n);
    },
    onStage: (name, stage) => progress?.stage(name, stage),
    onSiteEnd: (name, outcome) => progress?.finished(name, outcome.status === "failed"),
  });
  progress?.done();
  const width = Math.max(...result.sites.map((s) => s.name.length));
  const lines = result.sites.map((s) => {
    const o = s.outcome;
    const what = o.status === "failed" ? o.error : `${o.figures.flights} flight(s), ${o.figures.photos} photos, ${o.figures.withinBandPct} % within band`;
    return `  ${s.name.padEnd(width)}  ${STATUS_TEXT[o.status].padEnd(17)}  ${what}`;
  });
  const ok = result.sites.length - result.failed;
  process.stdout.write(
    `gsdplan campaign: ${result.sites.length} sites, ${ok} planned or current, ${result.failed} failed\n${lines.join("\n")}\n` +
      `  table: ${path.relative(process.cwd(), result.csvPath) || result.csvPath}\n  overview: ${path.relative(process.cwd(), result.indexPath) || result.indexPath}\n`,
  );
  return result;
}

/**
 * --jobs: a whole number >= 1; default the machine's available parallelism.
 * @example parseJobs("2") // 2
 */
export function parseJobs(raw: string | undefined): number {
  if (raw === undefined) return Math.max(1, availableParallelism());
  const v = Number(raw.trim());
  if (!Number.isInteger(v) || v < 1) throw new InputError("--jobs", raw, "a whole number >= 1", "not a number of threads");
  return v;
}
