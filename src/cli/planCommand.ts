import { access, stat } from "node:fs/promises";
import path from "node:path";
import { flagOverridesFromParsed, loadPlanFile, resolvePlanOptions } from "../plan/options.js";
import { planMission, type PlanStage } from "../plan/plan.js";
import { OUTPUT_NAMES, planOutputs } from "../plan/outputs.js";
import { writeOutputSet, type OutputFile } from "../export/atomicDir.js";
import type { PlanOptions } from "../plan/options.js";
import type { PlanSummary } from "../plan/summary.js";
import { InputError } from "../errors.js";
import { constants, existsSync } from "node:fs";
import { summaryText } from "./summaryText.js";
import { collectGarbage } from "./fullGc.js";
import { packageVersion } from "../packageRoot.js";
import { stageProgress } from "./progress.js";

const STAGES: readonly PlanStage[] = ["load", "layout", "solve", "route", "assess", "baseline"];

/**
 * Runs `gsdplan plan` for parsed CLI options: resolve options, plan, write the
 * output set atomically, print the summary. Returns whether any cell is flagged.
 */
export async function runPlanCommand(
  planFile: string | undefined,
  opts: Record<string, unknown>,
  extra: { explainAllFlags?: boolean } = {},
): Promise<{ flagged: boolean; outDir: string }> {
  const file = planFile ? await loadPlanFile(planFile) : undefined;
  const options = resolvePlanOptions(file?.data ?? {}, flagOverridesFromParsed(opts), file?.dir);
  const outDir = String(opts.out);
  // Refuse early (before minutes of work) when outputs exist and --force is not given.
  await assertWritableTarget(outDir);
  if (!opts.force) {
    const present = OUTPUT_NAMES.filter((n) => existsSync(path.join(outDir, n)));
    if (present.length) {
      throw new InputError("--out", outDir, "a folder without earlier outputs, or --force to replace them", `outputs exist (${present.join(", ")})`);
    }
  }

  const progress = stageProgress(process.stderr, Boolean(opts.quiet) || Boolean(opts.json), STAGES);
  const summary = await planToFolder(options, {
    outDir,
    force: Boolean(opts.force),
    ...(file ? { planFile: file.file } : {}),
    onStage: (s) => progress.stage(s),
    afterRun: collectGarbage,
  });
  progress.done();
  if (opts.json) process.stdout.write(JSON.stringify(summary, null, 2) + "\n");
  else process.stdout.write(summaryText(summary, outDir, extra));
  return { flagged: summary.flagged.cells > 0, outDir };
}

/** What planToFolder needs besides the options. */
export interface PlanToFolderOptions {
  outDir: string;
  /** Replace earlier outputs of the same names. */
  force?: boolean;
  /** The plan file the options came from (its name goes into the report). */
  planFile?: string;
  /** Called at the start of each stage, then with "write" before the files are written. */
  onStage?: (stage: PlanStage | "write") => void;
  /**
   * A last look at the output set before it is written (gsdplan campaign adds its
   * inputs hash to summary.json here); the default writes the set as planned.
   */
  amendFiles?: (files: OutputFile[], summary: PlanSummary) => OutputFile[];
  /** Threads for the assessment's coverage passes (see PlanHooks.threads). */
  threads?: number;
  /**
   * Called once the run is let go (the output set built and the report's input reduced:
   * planOutputs' runReleased), before the files are written:
   * `gsdplan plan` collects garbage there (fullGc.ts), so the DEM window is not held
   * through the writing.
   */
  afterRun?: () => void;
}

/**
 * The plan job shared by `gsdplan plan` and `gsdplan campaign`: plan from resolved
 * options, build the output set and write it atomically into `outDir`.
 * @example const summary = await planToFolder(resolvePlanOptions(data, {}, dir), { outDir: "out" });
 */
export async function planToFolder(options: PlanOptions, o: PlanToFolderOptions): Promise<PlanSummary> {
  const { files, summary, runReleased } = await plannedOutputs(options, o);
  // The report's input reduced first (usually done by now: the maps come in during the
  // assessment), so the collection finds the run's DEM window unreferenced.
  if (o.afterRun) {
    await runReleased;
    o.afterRun();
  }
  await writeOutputSet(o.outDir, o.amendFiles ? o.amendFiles(files, summary) : files, { force: Boolean(o.force) });
  return summary;
}

/**
 * The plan and its output set, made in a function of its own so that the run is let go when
 * it returns: its DEM window is not held while the files are written (plan/outputs.ts).
 */
async function plannedOutputs(options: PlanOptions, o: PlanToFolderOptions): Promise<ReturnType<typeof planOutputs>> {
  const run = await planMission(options, { ...(o.onStage ? { onStage: o.onStage } : {}), ...(o.threads !== undefined ? { threads: o.threads } : {}), now: () => performance.now() });
  o.onStage?.("write");
  return planOutputs(run, {
    ...(o.planFile ? { planFile: o.planFile } : {}),
    toolVersion: packageVersion(),
    generatedAt: new Date().toISOString(),
  });
}

/**
 * Refuses an --out that cannot become a folder before minutes of planning: the
 * nearest existing ancestor must be a writable folder, and --out itself, if it
 * exists, a folder. The atomic writer checks again when it writes.
 * @example await assertWritableTarget("out/site-a") // throws InputError when "out" is a file
 */
export async function assertWritableTarget(outDir: string): Promise<void> {
  let p = path.resolve(outDir);
  for (;;) {
    const st = await stat(p).catch(() => null);
    if (st) {
      if (!st.isDirectory()) {
        const what = p === path.resolve(outDir) ? "it is a file, not a folder" : `${p} is a file, not a folder`;
        throw new InputError("--out", outDir, "a folder that exists or can be made", what);
      }
      const ok = await access(p, constants.W_OK).then(() => true, () => false);
      if (!ok) throw new InputError("--out", outDir, "a folder that exists or can be made", `${p} is not writable`);
      return;
    }
    const parent = path.dirname(p);
    if (parent === p) return;
    p = parent;
  }
}
