import type { Command } from "commander";
import { InputError } from "../../errors.js";

/**
 * `gsdplan inspect <dem>`: describes a DEM (CRS, size, cell size, extent, heights,
 * vertical reference, nodata, storage). The DEM modules load lazily in the action.
 * @example registerInspect(program)
 */
export function registerInspect(program: Command): void {
  program
    .command("inspect")
    .description("describe a GeoTIFF DEM: CRS, size, cell size in metres, extent, heights, vertical unit and datum, nodata, storage")
    .argument("<dem>", "GeoTIFF DEM file")
    .option("--json", "print the report as JSON")
    .option("--band <n>", "band to read heights from (1-based)", "1")
    .option("--vertical-unit <unit>", "override the vertical unit: metre, foot, ftUS (US survey foot)")
    .option("--vertical-datum <datum>", "override the vertical datum: egm96, egm2008, ellipsoid, other")
    .action(async (dem: string, opts: { json?: boolean; band: string; verticalUnit?: string; verticalDatum?: string }) => {
      const band = Number(opts.band);
      if (!/^\d+$/.test(opts.band) || !Number.isInteger(band) || band < 1) throw new InputError("--band", opts.band, "an integer >= 1");
      const { inspectDem, formatDemReport } = await import("../../dem/inspect.js");
      const report = await inspectDem(dem, {
        band,
        verticalUnit: opts.verticalUnit,
        verticalDatum: opts.verticalDatum as never,
      });
      process.stdout.write(opts.json ? JSON.stringify(report, null, 2) + "\n" : formatDemReport(report));
    });
}
