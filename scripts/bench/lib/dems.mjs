// The benchmark DEMs, made once with GDAL into the temp folder and reused by later runs.
// The 8000 x 8000 raster is the DEM-window benchmark's own (hilly terrain in UTM 33N +
// EGM96, 0.5 m cells, Float32, 256 x 256 tiles, Deflate with predictor 3); the 16000 x
// 16000 one is four copies of it side by side, so a site in its north-west quarter sees
// exactly the same ground from a source file four times the size.
import { execFileSync } from "node:child_process";
import { existsSync, rmSync, renameSync } from "node:fs";
import { join, dirname } from "node:path";
import { ensureBenchDem } from "../dem-window.mjs";

/**
 * Size, geotransform and statistics of a raster, from `gdalinfo -json`.
 * @example rasterInfo(path).size // [8000, 8000]
 */
export function rasterInfo(file) {
  const j = JSON.parse(execFileSync("gdalinfo", ["-json", file], { encoding: "utf8", maxBuffer: 1 << 26 }));
  const [x0, dx, , y0, , dy] = j.geoTransform;
  return { file, size: j.size, x0, y0, dx, dy, blockSize: j.bands[0].block, type: j.bands[0].type, compression: j.metadata?.IMAGE_STRUCTURE?.COMPRESSION };
}

/** The 8000 x 8000 DEM (made by the DEM-window benchmark's generator if missing). */
export function demSmall() {
  return ensureBenchDem();
}

/**
 * The 16000 x 16000 DEM: the 8000 x 8000 one tiled 2 x 2, same origin, same encoding.
 * @example demLarge() // "/tmp/gsdplan-bench/dem16000_f32_deflate.tif"
 */
export function demLarge() {
  const src = demSmall();
  const out = join(dirname(src), "dem16000_f32_deflate.tif");
  if (existsSync(out)) return out;
  const info = rasterInfo(src);
  const [w, h] = info.size;
  const wM = w * info.dx, hM = h * info.dy; // hM < 0
  const parts = [];
  for (const [i, j] of [[0, 0], [1, 0], [0, 1], [1, 1]]) {
    const vrt = join(dirname(src), `copy_${i}${j}.vrt`);
    const ulx = info.x0 + i * wM, uly = info.y0 + j * hM;
    execFileSync("gdal_translate", ["-q", "-of", "VRT", "-a_ullr", String(ulx), String(uly), String(ulx + wM), String(uly + hM), src, vrt]);
    parts.push(vrt);
  }
  const mosaic = join(dirname(src), "mosaic16000.vrt");
  execFileSync("gdalbuildvrt", ["-q", mosaic, ...parts]);
  const tmp = out + ".part.tif";
  rmSync(tmp, { force: true });
  execFileSync("gdal_translate", [
    "-q", "-co", "TILED=YES", "-co", "BLOCKXSIZE=256", "-co", "BLOCKYSIZE=256",
    "-co", "COMPRESS=DEFLATE", "-co", "PREDICTOR=3", "-co", "NUM_THREADS=2", "-co", "BIGTIFF=IF_SAFER",
    mosaic, tmp,
  ]);
  renameSync(tmp, out);
  for (const p of [...parts, mosaic]) rmSync(p, { force: true });
  return out;
}
