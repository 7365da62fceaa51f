/**
 * The usual cautions of the trade, shown by every output a pilot reads
 * (terminal summary, summary.json, report). gsdplan plans; the pilot in
 * command decides, under local rules and licensed practice.
 */
export const STANDARD_CAUTIONS: readonly string[] = [
  "Fly only within the law where you are, with the permissions it requires; local rules and special zones override the ceiling used here.",
  "Check airspace and temporary restrictions before the flight.",
  "The elevation model is not a survey of obstacles: trees, masts, wires and buildings may be missing from it.",
  "Keep visual line of sight where the rules require it.",
  "Verify the first waypoint heights on site before flying the plan.",
  "This tool plans; the pilot in command decides.",
];
