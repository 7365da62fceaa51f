import type { Command } from "commander";
import { CommanderError } from "commander";
import { isUserError } from "../errors.js";

/** Exit codes of the CLI. */
export const EXIT_OK = 0;
export const EXIT_INTERNAL = 1;
export const EXIT_BAD_INPUT = 2;
export const EXIT_FLAGGED = 3;

/**
 * Runs the program and maps errors to one line on stderr and an exit code:
 * 2 for input the user can fix, 1 for our own failures.
 */
export async function runMain(program: Command, argv: string[]): Promise<void> {
  program.exitOverride();
  program.configureOutput({ writeErr: (s) => process.stderr.write(s) });
  const debug = argv.includes("--debug");
  try {
    await program.parseAsync(argv);
  } catch (e) {
    if (e instanceof CommanderError) {
      if (e.code === "commander.helpDisplayed" || e.code === "commander.version" || e.exitCode === 0) {
        process.exitCode = EXIT_OK;
        return;
      }
      // commander already printed its one-line message
      process.exitCode = EXIT_BAD_INPUT;
      return;
    }
    if (isUserError(e)) {
      process.stderr.write(`gsdplan: ${e.message}\n`);
      if (debug) process.stderr.write(`${e.stack}\n`);
      process.exitCode = EXIT_BAD_INPUT;
      return;
    }
    const err = e as Error;
    process.stderr.write(`gsdplan: internal error: ${err?.message ?? String(e)}\n`);
    if (debug) process.stderr.write(`${err?.stack}\n`);
    else process.stderr.write("gsdplan: run again with --debug for details\n");
    process.exitCode = EXIT_INTERNAL;
  }
}
