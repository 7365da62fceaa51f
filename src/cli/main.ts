#!/usr/bin/env node
// The CLI stays thin: each command module declares its options and calls the library in
// its action. Users run it bundled into one file with the library (package.json's bin,
// dist/bundle/main.js, scripts/bundle.mjs), so it starts without resolving each module.
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { Command } from "commander";
import { registerCommands } from "./commands/index.js";
import { runMain } from "./run.js";
import { packageRoot } from "../packageRoot.js";

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

/** The version in package.json. */
function packageVersion(): string {
  try {
    return (JSON.parse(readFileSync(join(packageRoot(), "package.json"), "utf8")) as { version: string }).version;
  } catch {
    return "unknown";
  }
}
await runMain(program, process.argv);
