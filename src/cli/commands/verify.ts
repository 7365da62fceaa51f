import type { Command } from "commander";
import { EXIT_FLAGGED } from "../run.js";
import { loadVerifyInputs } from "../../verify/load.js";
import { verifyWaypoints } from "../../verify/verify.js";
import { verifyJson, verifyText } from "../../verify/format.js";

/**
 * `gsdplan verify <out-dir | waypoints.csv> --plan <plan-file>`: the independent
 * check of a written plan against the DEM and the plan file's limits. Exit 0
 * clean, 3 with any breach, 2 on bad input.
 * @example registerVerify(program)
 */
export function registerVerify(program: Command): void {
  program
    .command("verify")
    .argument("<target>", "an output folder of `gsdplan plan` (its waypoints.csv is read) or a waypoints.csv")
    .requiredOption("--plan <plan-file>", "the plan file whose DEM and limits the waypoints must keep")
    .option("--json", "print the result as JSON")
    .description(
      "check a waypoint list on its whole path against the DEM (in its own CRS) and the plan's limits: ground, clearance, ceiling, climb and descent rates, unknown ground, keep-out zones and their buffers, take-off",
    )
    .addHelpText("after", "\nExit codes: 0 no breach, 3 any breach, 2 bad input, 1 internal error.\nA clean check is not a permission to fly: local rules apply and the pilot in command decides.")
    .action(async (target: string, opts: { plan: string; json?: boolean }) => {
      const inputs = await loadVerifyInputs(target, opts.plan);
      const result = verifyWaypoints(inputs.rows, inputs.limits, inputs.dem);
      if (opts.json) process.stdout.write(verifyJson(result, inputs.limits));
      else {
        const notes = inputs.demWarnings.map((w) => `note: DEM: ${w}`);
        const header = [`gsdplan verify: ${inputs.csvPath} against ${inputs.options.dem} (${inputs.dem.crs.name}, its own grid)`, ...notes].join("\n");
        process.stdout.write(verifyText(result, inputs.limits, header));
      }
      if (!result.ok) process.exitCode = EXIT_FLAGGED;
    });
}
