#!/usr/bin/env node
// The CLI stays thin: each command module declares its options and loads the
// library lazily in its action, so `gsdplan --help` starts fast.
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
  .option("--debug", "print stack traces for errors")
  .showHelpAfterError(false);

registerCommands(program);
await runMain(program, process.argv);
