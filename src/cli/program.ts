// The CLI stays thin: each command module declares its options and calls the library in
// its action. Users run it bundled into one file with the library (package.json's bin,
// dist/bundle/main.js loading dist/bundle/cli.cjs, scripts/bundle.mjs), so it starts
// without resolving each module.
// First: the engine's settings for this process (engineSettings.ts), before any other module's code runs.
import "./engineSettings.js";
import { Command } from "commander";
import { registerCommands } from "./commands/index.js";
import { runMain } from "./run.js";
import { packageVersion } from "../packageRoot.js";

/**
 * Runs the gsdplan command line on `argv` (process.argv's form: node, script, arguments);
 * the exit code is left in process.exitCode.
 * @example await runCli(process.argv)
 */
export async function runCli(argv: string[]): Promise<void> {
  const program = new Command();
  program
    .name("gsdplan")
    .description(
      "Terrain-aware mapping flight planning: waypoint altitudes that hold the ground sample distance over hills.\n" +
        "Plans only; the pilot in command decides. Check local rules, airspace and obstacles before every flight.",
    )
    .version(packageVersion(), "-V, --version", "print the version of gsdplan")
    .option("--debug", "print stack traces for errors")
    .showHelpAfterError(false);

  registerCommands(program);

  await runMain(program, argv);
}
