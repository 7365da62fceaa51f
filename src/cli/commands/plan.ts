import type { Command } from "commander";
import { PLAN_OPTION_SPECS } from "../../plan/optionsSchema.js";
import { EXIT_FLAGGED } from "../run.js";
import { addPlanFlags } from "../planFlags.js";
import { runPlanCommand } from "../planCommand.js";

/**
 * `gsdplan plan [plan-file] --out <dir>`: the main job end to end. Every
 * plan-file key also has a flag; flags override the file.
 * @example registerPlan(program)
 */
export function registerPlan(program: Command): void {
  const cmd = program
    .command("plan")
    .argument("[plan-file]", "plan file (JSON or YAML); relative paths in it resolve against its folder")
    .description(
      "plan a terrain-following mapping flight: waypoints (CSV, GeoJSON, KML, GPX), GSD/image/flag rasters (GeoTIFF), summary.json and report.html",
    )
    .requiredOption("--out <dir>", "output folder (files are written as a set, atomically)")
    .option("--force", "replace existing outputs in --out")
    .option("--quiet", "no progress display")
    .option("--json", "print summary.json to stdout instead of the text summary")
    .option("--fail-on-flags", "exit with code 3 when any site cell is flagged");
  addPlanFlags(cmd, optionHelp);
  cmd.addHelpText("after", planHelpAfter());
  cmd.action(async (planFile: string | undefined, opts: Record<string, unknown>) => {
    const { flagged } = await runPlanCommand(planFile, opts);
    if (flagged && opts.failOnFlags) process.exitCode = EXIT_FLAGGED;
  });
}

function optionHelp(s: (typeof PLAN_OPTION_SPECS)[number]): string {
  // One sentence per key: what it is, what is allowed, the default (plan-file key last).
  const def = s.default === undefined ? "" : ` Default: ${JSON.stringify(s.default)}.`;
  const allowed = s.allowed ? ` Allowed: ${s.allowed.replace(/\.$/, "")}.` : "";
  return `${s.description.replace(/\.$/, "")}.${allowed}${def} [key ${s.key}]`;
}

function planHelpAfter(): string {
  return [
    "",
    "Target detail: give target.gsdCm (--gsd-cm), or target.smallestFeatureCm with a rule:",
    "  tenth: a pixel of a tenth of the feature (common practice);",
    "  detection / recognition / identification: 2 / 8 / 12.8 pixels across the feature (Johnson, 1958).",
    "Ceiling references: ground (straight below), surface (closest terrain point), takeoff (take-off ground).",
    "Exit codes: 0 plan written (even with flags), 2 bad input, 3 flagged with --fail-on-flags, 1 internal error.",
    "Cautions: local rules override any ceiling here; the DEM is not an obstacle survey; the pilot in command decides.",
  ].join("\n");
}
