/**
 * A terrain model (DTM, bare earth) read onto the cells of a surface model's window
 * (DSM), so every stage can read both at the same cell: the ground-referenced ceiling,
 * heights above terrain and the take-off ground from the one, clearance and GSD from the
 * other. Thin I/O: opens and reads the terrain model, then copies or resamples.
 */
import type { DemGrid } from "../dem/grid.js";
import { openDem, type OpenDemOptions } from "../dem/source.js";
import { readCells, readWindow } from "../dem/window.js";
import { sameCrs } from "../dem/mosaic.js";
import { sampleBilinear } from "../dem/sample.js";
import { CentreLattice } from "../dem/lattice.js";

export interface TerrainOnGrid {
  /** The terrain heights on exactly the surface window's cells (its transform, size, CRS), NaN where unknown. */
  grid: DemGrid;
  /** True when the terrain model's cells differ from the surface model's and were interpolated bilinearly. */
  resampled: boolean;
  /** Things the user must know (resampling, a vertical datum that differs, the source's own notes). */
  warnings: string[];
}

/**
 * Reads the terrain model `spec` (any form `dem` takes) onto the cells of `surface`, a
 * window as readWindow returns it (the surface model's own CRS). On the same lattice (same
 * CRS and cell size, origins whole cells apart) the cells are copied exactly; otherwise each
 * surface cell centre takes the terrain's bilinear height there (GDAL's `-r bilinear`
 * convention, between cell centres), with a warning. Cells past the terrain model are NaN.
 * @example
 * const t = await terrainOnGrid("fixtures/dsm/slope_dtm.tif", {}, dsmWindow);
 * t.grid.heights.length === dsmWindow.heights.length // true
 */
export async function terrainOnGrid(spec: string | readonly string[], open: OpenDemOptions, surface: DemGrid): Promise<TerrainOnGrid> {
  const source = await openDem(spec, open);
  try {
    const warnings = source.warnings.map((w) => `dtm: ${w}`);
    const { width: W, height: H } = surface;
    const t = surface.transform;
    const heights = new Float32Array(W * H).fill(NaN);
    const s = source.transform;
    const same = sameCrs(source.crs, surface.crs);
    const oc = (t.x0 - s.x0) / s.dx, or = (t.y0 - s.y0) / s.dy;
    const whole = (v: number) => Math.abs(v - Math.round(v)) < 1e-6;
    const onLattice = same && Math.abs(s.dx / t.dx - 1) < 1e-9 && Math.abs(s.dy / t.dy - 1) < 1e-9 && whole(oc) && whole(or);
    let resampled = false;
    if (onLattice) {
      const dCol = Math.round(oc), dRow = Math.round(or);
      const c0 = Math.max(0, dCol), c1 = Math.min(source.width, dCol + W);
      const r0 = Math.max(0, dRow), r1 = Math.min(source.height, dRow + H);
      if (c1 > c0 && r1 > r0) {
        const part = await readCells(source, { col0: c0, row0: r0, col1: c1, row1: r1 });
        for (let r = r0; r < r1; r++) {
          const from = (r - r0) * part.width;
          const to = (r - dRow) * W + (c0 - dCol);
          heights.set(part.heights.subarray(from, from + part.width), to);
        }
      }
    } else {
      resampled = true;
      const box = { west: t.x0, north: t.y0, east: t.x0 + W * t.dx, south: t.y0 + H * t.dy };
      // Two terrain cells of margin: bilinear at the window's edge needs the next centres.
      const cellM = Math.max(Math.abs(s.dx), Math.abs(s.dy)) * (source.crs.geographic ? 111_320 : source.crs.linearUnitM);
      const win = await readWindow(source, box, { crs: same ? "native" : surface.crs.proj4, marginM: 2 * cellM });
      const lattice = new CentreLattice(t, 0, 0, W, H, same ? null : surface.crs.proj4, same ? null : win.crs.proj4);
      const xs = new Float64Array(W), ys = new Float64Array(W), out = new Float64Array(W);
      for (let r = 0; r < H; r++) {
        for (let c = 0; c < W; c++) [xs[c], ys[c]] = lattice.at(c, r);
        sampleBilinear(win, xs, ys, out);
        for (let c = 0; c < W; c++) {
          const z = out[c];
          if (z === z) heights[r * W + c] = z;
        }
      }
      const why = !same ? `another CRS (${source.crs.epsg !== null ? `EPSG:${source.crs.epsg}` : source.crs.name})` : "other cells";
      warnings.push(
        `The terrain model (dtm) is on ${why} than the surface model (dem): its heights were interpolated bilinearly onto the surface model's cells, ` +
          "which smooths the terrain between its own cell centres (the ground ceiling and heights above terrain carry that).",
      );
    }
    const known = (d: DemGrid["verticalDatum"]) => d !== "unknown" && d !== "other";
    if (known(source.verticalDatum) && known(surface.verticalDatum) && source.verticalDatum !== surface.verticalDatum) {
      warnings.push(
        `The terrain model (dtm) declares the vertical datum ${source.verticalDatum}, the surface model (dem) ${surface.verticalDatum}: ` +
          "their heights are compared as they are. Give both models on one datum.",
      );
    }
    return { grid: { ...surface, heights }, resampled, warnings };
  } finally {
    await source.close();
  }
}
