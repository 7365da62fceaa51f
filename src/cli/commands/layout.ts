import type { Command } from "commander";
import { addPlanFlags } from "../planFlags.js";
import { loadPlanFile, resolvePlanOptions, flagOverridesFromParsed } from "../../plan/options.js";
import { prepareMission, missionLayout } from "../../plan/plan.js";
import { siteCoverage } from "../../layout/site.js";
import { layoutSummaryLines } from "../../layout/summary.js";

/**
 * `gsdplan layout`: lays out the flight strips for a plan (a plan file and/or
 * the plan's own flags) and prints the summary: strips, spacing, trigger
 * distance, ground speed and its binding limit, heading and why.
 * @example registerLayout(program)
 */
export function registerLayout(program: Command): void {
  const cmd = program
    .command("layout")
    .description("lay out flight strips over the site and print the summary: strips, spacing, trigger distance, ground speed and its binding limit, heading and why")
    .option("--plan <file>", "plan file (JSON or YAML); flags override its keys")
    .option("--json", "print the layout (local-frame metres) as JSON");
  addPlanFlags(cmd, (s) => s.description);
  cmd.action(async (opts: Record<string, unknown>) => {
    process.stdout.write(await runLayoutCommand(opts));
  });
}

/**
 * Runs the layout for parsed command-line options and returns the text to print.
 * @example process.stdout.write(await runLayoutCommand({ plan: "plan.yaml" }))
 */
export async function runLayoutCommand(opts: Record<string, unknown>): Promise<string> {
  const file = typeof opts.plan === "string" ? await loadPlanFile(opts.plan) : undefined;
  const po = resolvePlanOptions(file?.data ?? {}, flagOverridesFromParsed(opts), file?.dir);
  const m = await prepareMission(po);
  const { frame, site, grid, speed } = m;
  const coverage = siteCoverage(site, grid);
  const layout = missionLayout(m, po);
  if (opts.json) {
    return (
      JSON.stringify(
        { frame: { proj4: frame.proj4, epsg: frame.epsg, name: frame.name }, site: { name: site.name, areaM2: site.areaM2, notes: site.notes ?? [] }, coverage, speed, layout },
        null,
        2,
      ) + "\n"
    );
  }
  const notes = [`local frame: ${frame.name} (${frame.reason})`, ...m.warnings.map((w) => w.message)];
  return (
    layoutSummaryLines({
      site,
      layout,
      speedMps: speed.speedMps,
      speedLimit: speed.limit,
      transitSpeedMps: po.aircraft.transitSpeedMps,
      heightAglM: m.targetHeightM,
      targetGsdCm: m.requirement.targetGsdM * 100,
      notes,
    }).join("\n") + "\n"
  );
}
