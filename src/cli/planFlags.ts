import type { Command } from "commander";
import { PLAN_OPTION_SPECS, type PlanOptionSpec } from "../plan/optionsSchema.js";

/**
 * One command-line flag per plan-file key on `cmd`: booleans bare, a list of
 * paths repeatable (each use adds one), every other key with one value.
 * @example addPlanFlags(program.command("plan"), (s) => s.description)
 */
export function addPlanFlags(cmd: Command, help: (s: PlanOptionSpec) => string): Command {
  for (const s of PLAN_OPTION_SPECS) {
    if (s.kind === "boolean") cmd.option(s.flag, help(s));
    else if (s.kind === "paths" || s.kind === "sources" || s.kind === "lonlat") cmd.option(`${s.flag} <value>`, `${help(s)} (repeatable)`, (v: string, prev: string[] | undefined) => [...(prev ?? []), v]);
    else cmd.option(`${s.flag} <value>`, help(s));
  }
  return cmd;
}
