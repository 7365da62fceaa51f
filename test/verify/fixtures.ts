import { openDem } from "../../src/dem/source.js";
import { readCells } from "../../src/dem/window.js";
import { makeSurface, type Surface } from "../../src/verify/surface.js";

/** A whole (small) truth fixture as the checks see it, read by the project's own DEM reader. */
export async function wholeSurface(file: string): Promise<Surface> {
  const dem = await openDem(file);
  try {
    return makeSurface(await readCells(dem, { col0: 0, row0: 0, col1: dem.width, row1: dem.height }), null);
  } finally {
    await dem.close();
  }
}
