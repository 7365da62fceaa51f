import type { Command } from "commander";
import path from "node:path";
import { runPlanCommand } from "../planCommand.js";
import { packageRoot } from "../../packageRoot.js";

/**
 * `gsdplan demo [--out dir]`: plans the bundled invented demo site (the Corrie
 * Vane quarry parcel) and explains every flag kind in the terminal summary.
 * @example registerDemo(program)
 */
export function registerDemo(program: Command): void {
  program
    .command("demo")
    .description("plan the bundled demo site (an invented hill-country parcel) and print where the report is")
    .option("--out <dir>", "output folder", "gsdplan-demo")
    .option("--quiet", "no progress display")
    .option("--json", "print summary.json to stdout")
    .action(async (opts: { out: string; quiet?: boolean; json?: boolean }) => {
      const planFile = path.join(packageRoot(), "fixtures", "demo", "corrie-vane-plan.yaml");
      // The demo is re-run freely: its own outputs are replaced.
      const { outDir } = await runPlanCommand(planFile, { out: opts.out, force: true, quiet: opts.quiet, json: opts.json }, { explainAllFlags: true });
      if (!opts.json) process.stdout.write(`demo report: ${path.resolve(outDir, "report.html")}\n`);
    });
}
