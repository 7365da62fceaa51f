import type { Command } from "commander";
import { registerInspect } from "./inspect.js";
import { registerLayout } from "./layout.js";
import { registerPlan } from "./plan.js";
import { registerReport } from "./report.js";
import { registerDemo } from "./demo.js";
import { registerVerify } from "./verify.js";
import { registerCampaign } from "./campaign.js";

/**
 * Every subcommand registers itself here. Command modules must keep heavy
 * imports (geotiff, turf, proj4) inside their action handlers.
 */
export function registerCommands(program: Command): void {
  registerInspect(program);
  registerLayout(program);
  registerPlan(program);
  registerReport(program);
  registerDemo(program);
  registerVerify(program);
  registerCampaign(program);
}
