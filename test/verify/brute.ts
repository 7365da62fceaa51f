/**
 * Brute-force references for the exact checks, written on their own: bilinear
 * interpolation by its textbook definition on heights read by GDAL, and fine sampling.
 */

/** Heights row-major from the north-west, cell centre (c, r) at index point (c, r). */
export interface Raster {
  width: number;
  height: number;
  z: Float64Array;
}

/** Bilinear height between the four cell centres around index point (c, r). */
export function bilinear(g: Raster, c: number, r: number): number {
  const i = Math.min(Math.floor(c), g.width - 2);
  const j = Math.min(Math.floor(r), g.height - 2);
  const u = c - i;
  const v = r - j;
  const at = (a: number, b: number) => g.z[b * g.width + a];
  return at(i, j) * (1 - u) * (1 - v) + at(i + 1, j) * u * (1 - v) + at(i, j + 1) * (1 - u) * v + at(i + 1, j + 1) * u * v;
}

/**
 * Highest ground in the disc of radius R (cells) around (c, r): a grid of `perCell` samples per
 * cell aligned to the centres (every centre is a sample) plus `rimSteps` points on the rim.
 * Also the highest centre alone.
 */
export function bruteDisc(g: Raster, c: number, r: number, R: number, perCell: number, rimSteps: number): { max: number; centresOnly: number } {
  let max = -Infinity;
  let centresOnly = -Infinity;
  const h = 1 / perCell;
  for (let y = Math.ceil((r - R) * perCell) * h; y <= r + R; y += h)
    for (let x = Math.ceil((c - R) * perCell) * h; x <= c + R; x += h) {
      if ((x - c) ** 2 + (y - r) ** 2 > R * R) continue;
      const z = bilinear(g, x, y);
      if (z > max) max = z;
      const isCentre = Math.abs(x - Math.round(x)) < 1e-9 && Math.abs(y - Math.round(y)) < 1e-9;
      if (isCentre && z > centresOnly) centresOnly = z;
    }
  for (let k = 0; k < rimSteps; k++) {
    const a = (2 * Math.PI * k) / rimSteps;
    const z = bilinear(g, c + R * Math.cos(a), r + R * Math.sin(a));
    if (z > max) max = z;
  }
  return { max, centresOnly };
}

/** Highest centre within R, and the highest rim sample: enough on 1 m cells, where the maximum is one or the other. */
export function discByCentresAndRim(g: Raster, c: number, r: number, R: number, rimSteps: number): number {
  let max = -Infinity;
  for (let j = Math.ceil(r - R); j <= r + R; j++)
    for (let i = Math.ceil(c - R); i <= c + R; i++) if ((i - c) ** 2 + (j - r) ** 2 <= R * R) max = Math.max(max, g.z[j * g.width + i]);
  for (let k = 0; k < rimSteps; k++) {
    const a = (2 * Math.PI * k) / rimSteps;
    max = Math.max(max, bilinear(g, c + R * Math.cos(a), r + R * Math.sin(a)));
  }
  return max;
}
