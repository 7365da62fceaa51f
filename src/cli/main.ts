#!/usr/bin/env node
// The CLI stays thin: each command module declares its options and loads the
// library lazily in its action, so `gsdplan --help` starts fast.
import { readFileSync } from "node:fs";
import { Command } from "commander";
import { registerCommands } from "./commands/index.js";
import { runMain } from "./run.js";

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

/** The version in package.json (dist/cli/main.js sits two folders below it). */
function packageVersion(): string {
  try {
    return (JSON.parse(readFileSync(new URL("../../package.json", import.meta.url), "utf8")) as { version: string }).version;
  } catch {
    return "unknown";
  }
}
await runMain(program, process.argv);
