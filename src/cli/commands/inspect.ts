import type { Command } from "commander";
import { InputError } from "../../errors.js";
import { inspectDem, formatDemReport } from "../../dem/inspect.js";

/**
 * `gsdplan inspect <dem>`: describes a DEM (CRS, size, cell size, extent, heights,
 * vertical reference, nodata, storage). The DEM modules load lazily in the action.
 * @example registerInspect(program)
 */
export function registerInspect(program: Command): void {
  program
    .command("inspect")
    .description("describe a DEM (a GeoTIFF, a list of tiles, a folder of them, a GDAL VRT mosaic or an http(s) URL of a GeoTIFF): CRS, size, cell size in metres, extent, heights, vertical unit and datum, nodata, storage, and each source of a mosaic")
    .argument("<dem...>", "GeoTIFF file, folder, VRT or http(s) URL; several (or a comma-separated list) make one mosaic")
    .option("--json", "print the report as JSON")
    .option("--band <n>", "band to read heights from (1-based)", "1")
    .option("--vertical-unit <unit>", "override the vertical unit: metre, foot, ftUS (US survey foot)")
    .option("--vertical-datum <datum>", "override the vertical datum: egm96, egm2008, ellipsoid, other")
    .action(async (dems: string[], opts: { json?: boolean; band: string; verticalUnit?: string; verticalDatum?: string }) => {
      const band = Number(opts.band);
      if (!/^\d+$/.test(opts.band) || !Number.isInteger(band) || band < 1) throw new InputError("--band", opts.band, "an integer >= 1");
      // As --dem takes them: several arguments, or a comma-separated list.
      const list = dems.flatMap((d) => d.split(",")).map((d) => d.trim()).filter((d) => d !== "");
      const report = await inspectDem(list.length === 1 ? list[0] : list, {
        band,
        verticalUnit: opts.verticalUnit,
        verticalDatum: opts.verticalDatum as never,
      });
      process.stdout.write(opts.json ? JSON.stringify(report, null, 2) + "\n" : formatDemReport(report));
    });
}
