import type { Command } from "commander";
import { EXIT_FLAGGED } from "../run.js";
import { runCampaignCommand } from "../../campaign/command.js";

/**
 * `gsdplan campaign <campaign-file> --out <dir>`: many sites in one run, in parallel.
 * Exit 0 when every site is planned (or current), 3 when any failed, 2 for a bad
 * campaign file (nothing written).
 * @example registerCampaign(program)
 */
export function registerCampaign(program: Command): void {
  program
    .command("campaign")
    .argument("<campaign-file>", "campaign file (JSON or YAML): defaults (plan keys) and sites (each a name and plan keys over the defaults); relative paths resolve against its folder")
    .description("plan many sites in one run: <out>/<name>/ per site (the output set of gsdplan plan), campaign.csv and index.html at the top")
    .requiredOption("--out <dir>", "output folder: one folder per site, campaign.csv and index.html")
    .option("--jobs <n>", "sites planned at once, each on its own worker thread (default: the number of cores)")
    .option("--force", "re-plan every site, even those whose outputs are current")
    .option("--quiet", "no progress display")
    .addHelpText(
      "after",
      [
        "",
        "A site whose outputs are current (the same options, input files and gsdplan version, by the",
        "inputsHash in its summary.json) is skipped, so an interrupted campaign resumes where it stopped.",
        "A site that fails is reported in campaign.csv (status failed, its error) and the others go on.",
        "Exit codes: 0 all sites planned or current, 3 any site failed, 2 bad campaign file or options, 1 internal error.",
        "Cautions: local rules override any ceiling here; the DEM is not an obstacle survey; the pilot in command decides.",
      ].join("\n"),
    )
    .action(async (campaignFile: string, opts: { out: string; jobs?: string; force?: boolean; quiet?: boolean }) => {
      const { failed } = await runCampaignCommand(campaignFile, opts);
      if (failed > 0) process.exitCode = EXIT_FLAGGED;
    });
}
