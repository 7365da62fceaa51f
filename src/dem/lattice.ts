import proj4 from "proj4";

// Coordinates are computed exactly every LATTICE_STEP cells and interpolated in between,
// the approach of GDAL's approximate transformer (gdalwarp -et); over a few tens of metres
// a map projection is linear far below a millimetre.
export const LATTICE_STEP = 16;

/**
 * Where the centres of a block of cells of one north-up grid fall in another CRS: exact at
 * lattice nodes every LATTICE_STEP cells (and on the last row and column), bilinear in
 * between. `fromProj4 === toProj4` (or null) gives the exact affine centres.
 * @example
 * const m = new CentreLattice({ x0: 500000, y0: 5200000, dx: 1, dy: -1 }, 0, 0, 100, 100, utm33, utm32);
 * const [x, y] = m.at(10, 20);
 */
export class CentreLattice {
  private readonly lw: number;
  private readonly lh: number;
  private readonly lx: Float64Array;
  private readonly ly: Float64Array;
  private readonly out: [number, number] = [0, 0];

  constructor(
    private readonly t: { x0: number; y0: number; dx: number; dy: number },
    private readonly col0: number,
    private readonly row0: number,
    private readonly width: number,
    private readonly height: number,
    fromProj4: string | null,
    toProj4: string | null,
  ) {
    const identity = !fromProj4 || !toProj4 || fromProj4 === toProj4;
    this.lw = Math.ceil((width - 1) / LATTICE_STEP) + 1;
    this.lh = Math.ceil((height - 1) / LATTICE_STEP) + 1;
    this.lx = new Float64Array(this.lw * this.lh);
    this.ly = new Float64Array(this.lw * this.lh);
    const conv = identity ? null : proj4(fromProj4!, toProj4!);
    for (let j = 0; j < this.lh; j++) {
      const row = row0 + Math.min(j * LATTICE_STEP, height - 1);
      for (let i = 0; i < this.lw; i++) {
        const col = col0 + Math.min(i * LATTICE_STEP, width - 1);
        const x = t.x0 + (col + 0.5) * t.dx, y = t.y0 + (row + 0.5) * t.dy;
        const [u, v] = conv ? conv.forward([x, y]) : [x, y];
        this.lx[j * this.lw + i] = u;
        this.ly[j * this.lw + i] = v;
      }
    }
  }

  /** The centre of cell (col, row) in the target CRS (the returned pair is reused). */
  at(col: number, row: number): [number, number] {
    const c = col - this.col0, r = row - this.row0;
    const { lw, lh, lx, ly, width, height } = this;
    const i = Math.min(Math.floor(c / LATTICE_STEP), Math.max(0, lw - 2));
    const j = Math.min(Math.floor(r / LATTICE_STEP), Math.max(0, lh - 2));
    const cA = Math.min(i * LATTICE_STEP, width - 1), cB = Math.min((i + 1) * LATTICE_STEP, width - 1);
    const rA = Math.min(j * LATTICE_STEP, height - 1), rB = Math.min((j + 1) * LATTICE_STEP, height - 1);
    const u = cB > cA ? (c - cA) / (cB - cA) : 0;
    const v = rB > rA ? (r - rA) / (rB - rA) : 0;
    const i1 = Math.min(i + 1, lw - 1), j1 = Math.min(j + 1, lh - 1);
    const k00 = j * lw + i, k10 = j * lw + i1, k01 = j1 * lw + i, k11 = j1 * lw + i1;
    this.out[0] = (1 - v) * ((1 - u) * lx[k00] + u * lx[k10]) + v * ((1 - u) * lx[k01] + u * lx[k11]);
    this.out[1] = (1 - v) * ((1 - u) * ly[k00] + u * ly[k10]) + v * ((1 - u) * ly[k01] + u * ly[k11]);
    return this.out;
  }
}
