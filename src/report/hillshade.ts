/**
 * Hill shading of a height grid by Horn's method.
 *
 * Horn, B.K.P. (1981) "Hill shading and the reflectance map", Proc. IEEE 69(1), 14-47:
 * the surface gradient at a cell is the weighted (1-2-1) difference of its 3x3
 * neighbourhood, and the shade is the cosine of the angle between the surface normal
 * and the direction to the sun (a Lambertian reflectance map).
 *
 * Conventions (all in the grid's own frame, x east, y north, rows running south):
 * - p = dz/dx (east), q = dz/dy (north), from the 3x3 window z1..z9 read row by row
 *   from the north-west corner:
 *     p = ((z3 + 2 z6 + z9) - (z1 + 2 z4 + z7)) / (8 dx)
 *     q = ((z1 + 2 z2 + z3) - (z7 + 2 z8 + z9)) / (8 dy)
 * - slope = atan(zFactor * sqrt(p^2 + q^2));
 * - aspect = compass direction the slope faces (downhill), degrees clockwise from grid
 *   north: aspect = atan2(-p, -q). A plane falling towards the east has aspect 90.
 * - shade = cos(zenith) cos(slope) + sin(zenith) sin(slope) cos(azimuth - aspect),
 *   zenith = 90 - sun altitude, azimuth clockwise from grid north; negative values
 *   (self-shadowed) are clamped to 0.
 */

/** The part of a DEM grid the shading needs (a DemGrid satisfies it). */
export interface HeightGrid {
  width: number;
  height: number;
  /** Row-major, north row first, NaN where nodata. */
  heights: Float32Array;
  /** Cell size in metres [x, y], both positive. */
  cellSizeM: [number, number];
}

/**
 * Horn's gradient for every cell: p = dz/dx (east), q = dz/dy (north), in height units
 * per metre. A neighbour that is outside the grid or nodata takes the centre cell's
 * height (so edges and nodata borders get a one-sided estimate instead of a hole);
 * cells that are themselves nodata get NaN.
 *
 * @example
 * const { p, q } = hornGradient(grid); // p[i] = 0.1 on a plane z = 0.1 x
 */
export function hornGradient(grid: HeightGrid): { p: Float32Array; q: Float32Array } {
  const { width: w, height: h } = grid;
  const p = new Float32Array(w * h);
  const q = new Float32Array(w * h);
  for (let r = 0; r < h; r++) hornRow(grid, r, p.subarray(r * w, (r + 1) * w), q.subarray(r * w, (r + 1) * w));
  return { p, q };
}

/** Horn's gradient along row `r` into `p` and `q` (one row long each): see hornGradient. */
function hornRow(grid: HeightGrid, r: number, p: Float32Array, q: Float32Array): void {
  const { width: w, height: h, heights: z } = grid;
  const [dx, dy] = grid.cellSizeM;
  const ex = 1 / (8 * dx);
  const ny = 1 / (8 * dy);
  const rn = r > 0 ? r - 1 : r;
  const rs = r < h - 1 ? r + 1 : r;
  // At an edge the clamped neighbour equals the centre, so the difference spans one
  // cell, not two: scale it back up to keep the gradient unbiased.
  const spanY = (rs - rn) / 2;
  for (let c = 0; c < w; c++) {
    const i = r * w + c;
    const z5 = z[i];
    if (z5 !== z5) {
      p[c] = NaN;
      q[c] = NaN;
      continue;
    }
    const cw = c > 0 ? c - 1 : c;
    const ce = c < w - 1 ? c + 1 : c;
    // Inline reads with nodata fallback to the centre: no per-cell allocation.
    let v: number;
    const z1 = (v = z[rn * w + cw]) === v ? v : z5;
    const z2 = (v = z[rn * w + c]) === v ? v : z5;
    const z3 = (v = z[rn * w + ce]) === v ? v : z5;
    const z4 = (v = z[r * w + cw]) === v ? v : z5;
    const z6 = (v = z[r * w + ce]) === v ? v : z5;
    const z7 = (v = z[rs * w + cw]) === v ? v : z5;
    const z8 = (v = z[rs * w + c]) === v ? v : z5;
    const z9 = (v = z[rs * w + ce]) === v ? v : z5;
    const spanX = (ce - cw) / 2;
    p[c] = spanX > 0 ? ((z3 + 2 * z6 + z9 - (z1 + 2 * z4 + z7)) * ex) / spanX : 0;
    q[c] = spanY > 0 ? ((z1 + 2 * z2 + z3 - (z7 + 2 * z8 + z9)) * ny) / spanY : 0;
  }
}

/**
 * Slope (radians) and aspect (degrees clockwise from grid north, the downhill direction;
 * NaN on flat cells and nodata) from Horn's gradient.
 *
 * @example
 * const { slopeRad, aspectDeg } = slopeAspect(grid, 1);
 */
export function slopeAspect(grid: HeightGrid, zFactor = 1): { slopeRad: Float32Array; aspectDeg: Float32Array } {
  const { p, q } = hornGradient(grid);
  const n = p.length;
  const slopeRad = new Float32Array(n);
  const aspectDeg = new Float32Array(n);
  for (let i = 0; i < n; i++) {
    const pi = p[i] * zFactor;
    const qi = q[i] * zFactor;
    slopeRad[i] = Math.atan(Math.hypot(pi, qi));
    if (pi === 0 && qi === 0) aspectDeg[i] = NaN;
    else {
      const a = (Math.atan2(-pi, -qi) * 180) / Math.PI;
      aspectDeg[i] = a < 0 ? a + 360 : a;
    }
  }
  return { slopeRad, aspectDeg };
}

/** A configured shading pass: call it on a grid to get shade in [0, 1] (NaN where nodata). */
export interface Hillshade {
  (grid: HeightGrid): Float32Array;
  /** Sun azimuth, degrees clockwise from grid north (default 315, the north-west sun of cartographic convention). */
  azimuth(): number;
  azimuth(deg: number): Hillshade;
  /** Sun altitude above the horizon, degrees (default 45). */
  altitude(): number;
  altitude(deg: number): Hillshade;
  /** Vertical exaggeration applied to the heights (default 1). */
  zFactor(): number;
  zFactor(k: number): Hillshade;
}

/**
 * A hill-shading generator in the d3 style: settings by chained setters, no hidden state.
 *
 * @example
 * const shade = hillshade().azimuth(315).altitude(45).zFactor(1)(grid); // Float32Array in [0, 1]
 */
export function hillshade(): Hillshade {
  let azimuthDeg = 315;
  let altitudeDeg = 45;
  let zf = 1;

  const run = (grid: HeightGrid): Float32Array => {
    const w = grid.width;
    // The gradient one row at a time (the same Float32 values hornGradient gives), so no
    // grid-sized gradient arrays are made.
    const p = new Float32Array(w);
    const q = new Float32Array(w);
    const zen = ((90 - altitudeDeg) * Math.PI) / 180;
    const az = (azimuthDeg * Math.PI) / 180;
    // Sun direction (east, north, up) and the unnormalised normal (-p, -q, 1): the dot
    // product over |normal| equals Horn's cos(zen)cos(slope) + sin(zen)sin(slope)cos(az - aspect)
    // without any trigonometry per cell.
    const sx = Math.sin(zen) * Math.sin(az);
    const sy = Math.sin(zen) * Math.cos(az);
    const sz = Math.cos(zen);
    const out = new Float32Array(w * grid.height);
    for (let r = 0; r < grid.height; r++) {
      hornRow(grid, r, p, q);
      for (let c = 0, i = r * w; c < w; c++, i++) {
        const pi = p[c] * zf;
        const qi = q[c] * zf;
        if (pi !== pi) {
          out[i] = NaN;
          continue;
        }
        const s = (sz - pi * sx - qi * sy) / Math.sqrt(1 + pi * pi + qi * qi);
        out[i] = s > 0 ? s : 0;
      }
    }
    return out;
  };

  const gen = run as Hillshade;
  gen.azimuth = ((deg?: number) => {
    if (deg === undefined) return azimuthDeg;
    azimuthDeg = deg;
    return gen;
  }) as Hillshade["azimuth"];
  gen.altitude = ((deg?: number) => {
    if (deg === undefined) return altitudeDeg;
    altitudeDeg = deg;
    return gen;
  }) as Hillshade["altitude"];
  gen.zFactor = ((k?: number) => {
    if (k === undefined) return zf;
    zf = k;
    return gen;
  }) as Hillshade["zFactor"];
  return gen;
}
