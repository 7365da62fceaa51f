/**
 * The demo site's terrain as one analytic function: an invented parcel of hill
 * country ("Corrie Vane quarry parcel") with a ridge, a valley, a quarry face,
 * a narrow ravine and a lidar void. Both the generator (scripts/make-demo.mjs)
 * and the terrain test (test/demo/terrain.test.ts) use it, so the test can
 * check the GeoTIFF that GDAL wrote against the formula it came from.
 *
 * The terrain is synthetic. The place is a plausible hill-country location in
 * UTM zone 30N chosen for the demo; no survey of any real ground is implied.
 *
 * Coordinates are UTM easting/northing in metres (EPSG:32630); heights are
 * metres above the EGM96 geoid (EPSG:5773). Everything here is pure: numbers
 * in, numbers out, no I/O and no randomness (the noise is a hash of the
 * lattice coordinates, so every run gives the same heights).
 */

export const SITE_NAME = "Corrie Vane quarry parcel";
export const SLUG = "corrie-vane";
export const EPSG_HORIZONTAL = 32630;
/** EGM96 height (EPSG:5773). */
export const EPSG_VERTICAL = 5773;
export const NODATA = -9999;

/** South-west corner of the 1500 m x 1000 m parcel's bounding box (UTM metres). */
export const SITE_ORIGIN = { eastingM: 521000, northingM: 6141000 };
export const SITE_SIZE = { widthM: 1500, heightM: 1000 };

/**
 * The DEM window: the parcel plus a 200 m margin all round, at 1 m cells,
 * north-up. `x0`, `y0` is the top-left corner (GDAL geotransform origin).
 */
export const DEM_WINDOW = Object.freeze({
  marginM: 200,
  cellM: 1,
  width: 1900,
  height: 1400,
  x0: 521000 - 200,
  y0: 6141000 + 1000 + 200,
});

// ---------------------------------------------------------------------------
// Feature parameters, in site-local metres: u east and v north of SITE_ORIGIN.

const BASE = { heightM: 260, eastGradient: -0.03 };

/** Ridge: a Gaussian cross-section along a wavy, roughly east-west crest line. */
const RIDGE = { crestV0: 780, crestSlope: 0.08, waveAmpM: 30, waveLenM: 1100, heightM: 125, heightWaveM: 15, sigmaM: 270 };

/** Valley: a Gaussian trough along a meandering line in the south. */
const VALLEY = { centreV0: 190, meanderAmpM: 35, meanderLenM: 900, phase: 0.7, depthM: 40, sigmaM: 140 };

/** Hash-based value noise: two octaves of gentle roughness. */
const NOISE = [
  { wavelengthM: 120, ampM: 2.5, seed: 11 },
  { wavelengthM: 30, ampM: 0.3, seed: 29 },
];

/**
 * Quarry: a flat floor cut into the ridge's south flank. Inside the rounded
 * rectangle the ground is lowered to the floor wherever it stands higher; the
 * south side, where the natural ground is already below the floor, stays open
 * (the quarry entrance). The edge goes from natural ground to the floor over
 * `edgeM`, so the north face is a near-vertical step.
 */
const QUARRY = { u0: 1080, u1: 1340, v0: 460, v1: 650, cornerM: 20, edgeM: 4, floorM: 0 /* set below */ };

/**
 * Ravine: a narrow gorge cut through the ridge crest on a straight NW-SE line
 * (a meltwater-channel shape): flat floor `floorHalfM` either side of the line,
 * walls out to `topHalfM`, the floor falling `floorGradient` per metre towards
 * the south-east. It starts where the floor meets the ground on the north flank
 * and fades out (the cut tapers to nothing over `taperM`) on the valley side.
 * Its deepest part, ~100 m at the crest, is deeper than ceiling minus
 * clearance (120 m - 30 m in the demo plan), so no legal, safe height exists
 * over its floor there; further along it is 40-80 m deep.
 */
const RAVINE = { crossU: 560, dirU: Math.SQRT1_2, dirV: -Math.SQRT1_2, floorHalfM: 5, topHalfM: 14, depthAtCrestM: 100, floorGradient: 0.12, sEndM: 700, taperM: 140, floorAtCrossM: 0, crossV: 0 };

/** The lidar void: a 30 m x 20 m block of nodata cells (a pond in the valley floor). */
const VOID = { u0: 420, u1: 450, v0: 200, v1: 220 };

// ---------------------------------------------------------------------------
// Value noise. Written by hand because it is twenty lines and must be
// bit-for-bit reproducible: no library random numbers, no Math.random.

/** 32-bit integer hash of a lattice point (a murmur3-style finaliser). -> [0, 1). */
function latticeHash(ix, iy, seed) {
  let h = Math.imul(ix | 0, 0x27d4eb2d) ^ Math.imul(iy | 0, 0x165667b1) ^ Math.imul(seed | 0, 0x9e3779b1);
  h = Math.imul(h ^ (h >>> 15), 0x85ebca6b);
  h = Math.imul(h ^ (h >>> 13), 0xc2b2ae35);
  h ^= h >>> 16;
  return (h >>> 0) / 4294967296;
}

/** Quintic fade 6t^5 - 15t^4 + 10t^3: smooth first and second derivatives at lattice lines. */
function fade(t) {
  return t * t * t * (t * (t * 6 - 15) + 10);
}

/**
 * Value noise in [-1, 1] at lattice coordinates (x, y).
 * @example valueNoise(3.5, 7.25, 11) // 0.2428 on every run
 */
export function valueNoise(x, y, seed) {
  const ix = Math.floor(x);
  const iy = Math.floor(y);
  const fx = fade(x - ix);
  const fy = fade(y - iy);
  const a = latticeHash(ix, iy, seed);
  const b = latticeHash(ix + 1, iy, seed);
  const c = latticeHash(ix, iy + 1, seed);
  const d = latticeHash(ix + 1, iy + 1, seed);
  const top = a + (b - a) * fx;
  const bottom = c + (d - c) * fx;
  return 2 * (top + (bottom - top) * fy) - 1;
}

/** Hermite smoothstep from 0 at e0 to 1 at e1. */
function smoothstep(e0, e1, x) {
  const t = Math.min(1, Math.max(0, (x - e0) / (e1 - e0)));
  return t * t * (3 - 2 * t);
}

// ---------------------------------------------------------------------------
// The components, in site-local metres.

/** Northing offset (local v) of the ridge crest line at local u. */
function crestV(u) {
  return RIDGE.crestV0 + RIDGE.crestSlope * (u - 750) + RIDGE.waveAmpM * Math.sin((2 * Math.PI * u) / RIDGE.waveLenM);
}

function ridgeHeightM(u) {
  return RIDGE.heightM + RIDGE.heightWaveM * Math.cos((2 * Math.PI * (u - 500)) / 1600);
}

function valleyV(u) {
  return VALLEY.centreV0 + VALLEY.meanderAmpM * Math.sin((2 * Math.PI * u) / VALLEY.meanderLenM + VALLEY.phase);
}

function noiseM(u, v) {
  let z = 0;
  for (const o of NOISE) z += o.ampM * valueNoise(u / o.wavelengthM, v / o.wavelengthM, o.seed);
  return z;
}

/** Ground before the quarry and ravine cuts. */
function naturalLocal(u, v) {
  const dr = v - crestV(u);
  const dv = v - valleyV(u);
  return (
    BASE.heightM +
    BASE.eastGradient * u +
    ridgeHeightM(u) * Math.exp(-(dr * dr) / (2 * RIDGE.sigmaM * RIDGE.sigmaM)) -
    VALLEY.depthM * Math.exp(-(dv * dv) / (2 * VALLEY.sigmaM * VALLEY.sigmaM)) +
    noiseM(u, v)
  );
}

/** Signed distance to the quarry's rounded rectangle: negative inside. */
function quarrySignedDistanceM(u, v) {
  const cu = (QUARRY.u0 + QUARRY.u1) / 2;
  const cv = (QUARRY.v0 + QUARRY.v1) / 2;
  const hu = (QUARRY.u1 - QUARRY.u0) / 2 - QUARRY.cornerM;
  const hv = (QUARRY.v1 - QUARRY.v0) / 2 - QUARRY.cornerM;
  const qu = Math.abs(u - cu) - hu;
  const qv = Math.abs(v - cv) - hv;
  const outside = Math.hypot(Math.max(qu, 0), Math.max(qv, 0));
  const inside = Math.min(Math.max(qu, qv), 0);
  return outside + inside - QUARRY.cornerM;
}

/** Position along (s, towards the south-east) and across (d) the ravine line. */
function ravineFrame(u, v) {
  const du = u - RAVINE.crossU;
  const dv = v - RAVINE.crossV;
  return [du * RAVINE.dirU + dv * RAVINE.dirV, -du * RAVINE.dirV + dv * RAVINE.dirU];
}

function ravineFloorLocal(s) {
  return RAVINE.floorAtCrossM - RAVINE.floorGradient * s;
}

// Derived parameters: fixed numbers chosen from the natural ground, so the
// step heights come out as the feature descriptions say.
QUARRY.floorM = Math.round(naturalLocal((QUARRY.u0 + QUARRY.u1) / 2, QUARRY.v0 + 10) * 100) / 100;
RAVINE.crossV = crestV(RAVINE.crossU);
RAVINE.floorAtCrossM = Math.round((naturalLocal(RAVINE.crossU, RAVINE.crossV) - RAVINE.depthAtCrestM) * 100) / 100;

function heightLocal(u, v) {
  let h = naturalLocal(u, v);
  const qm = 1 - smoothstep(-QUARRY.edgeM, 0, quarrySignedDistanceM(u, v));
  if (qm > 0 && h > QUARRY.floorM) h -= qm * (h - QUARRY.floorM);
  const [s, d] = ravineFrame(u, v);
  const rm = (1 - smoothstep(RAVINE.floorHalfM, RAVINE.topHalfM, Math.abs(d))) * (1 - smoothstep(RAVINE.sEndM - RAVINE.taperM, RAVINE.sEndM, s));
  if (rm > 0) {
    const f = ravineFloorLocal(s);
    if (h > f) h -= rm * (h - f);
  }
  return h;
}

function inVoidLocal(u, v) {
  return u >= VOID.u0 && u < VOID.u1 && v >= VOID.v0 && v < VOID.v1;
}

// ---------------------------------------------------------------------------
// Public functions, in UTM metres.

const toU = (x) => x - SITE_ORIGIN.eastingM;
const toV = (y) => y - SITE_ORIGIN.northingM;
const toX = (u) => u + SITE_ORIGIN.eastingM;
const toY = (v) => v + SITE_ORIGIN.northingM;

/**
 * Ground height before the quarry and ravine are cut (m, EGM96).
 * @example naturalHeightM(521560, 6141763) // ~383.8 on the ridge crest
 */
export function naturalHeightM(x, y) {
  return naturalLocal(toU(x), toV(y));
}

/**
 * Ground height of the demo terrain at a UTM point (m, EGM96), NaN in the lidar void.
 * @example terrainHeightM(521435, 6141210) // NaN: the void
 */
export function terrainHeightM(x, y) {
  const u = toU(x);
  const v = toV(y);
  return inVoidLocal(u, v) ? NaN : heightLocal(u, v);
}

/**
 * The value written to the GeoTIFF: height rounded to 0.01 m (so deflate
 * compresses it well), or NODATA in the void.
 * @example demValueM(521435, 6141210) // -9999
 */
export function demValueM(x, y) {
  const h = terrainHeightM(x, y);
  return Number.isNaN(h) ? NODATA : Math.round(h * 100) / 100;
}

/**
 * Every cell of the DEM window, row-major from the top-left, values at cell
 * centres as demValueM gives them (Float32).
 * @example demHeights().length // 1900 * 1400
 */
export function demHeights() {
  const { width, height, x0, y0, cellM } = DEM_WINDOW;
  const out = new Float32Array(width * height);
  for (let r = 0; r < height; r++) {
    const y = y0 - (r + 0.5) * cellM;
    for (let c = 0; c < width; c++) out[r * width + c] = demValueM(x0 + (c + 0.5) * cellM, y);
  }
  return out;
}

/**
 * Northing of the ridge crest line (the Gaussian's axis; the noise moves the
 * true summit of a cross-section by up to a few tens of metres) at an easting.
 * @example ridgeCrestNorthingM(521560) // ~6141763.1
 */
export function ridgeCrestNorthingM(x) {
  return toY(crestV(toU(x)));
}

/**
 * Ravine floor height (m) at the point of its centre line nearest (x, y), and
 * that point.
 * @example ravineCentreLine(521560, 6141763).floorM // ~283.8, 100 m below the crest
 */
export function ravineCentreLine(x, y) {
  const [s] = ravineFrame(toU(x), toV(y));
  const u = RAVINE.crossU + s * RAVINE.dirU;
  const v = RAVINE.crossV + s * RAVINE.dirV;
  return { x: toX(u), y: toY(v), s, floorM: ravineFloorLocal(s) };
}

/** Centre of a local (u, v) point in UTM. */
function utm(u, v) {
  return [toX(u), toY(v)];
}

/**
 * The features as the generator builds them, in UTM metres, for the report
 * of make-demo.mjs and for the terrain test. Rings are [x, y] in UTM; the
 * site's exterior is counter-clockwise and its hole clockwise.
 */
export const FEATURES = Object.freeze({
  ridge: {
    description: "Ridge running roughly east-west across the north of the parcel, crest line wavy, Gaussian cross-section",
    crestNorthingAtM: (x) => ridgeCrestNorthingM(x),
    reliefAboveBaseM: [RIDGE.heightM - RIDGE.heightWaveM, RIDGE.heightM + RIDGE.heightWaveM],
    sigmaM: RIDGE.sigmaM,
  },
  valley: {
    description: "Meandering valley along the south of the parcel, falling gently to the east",
    centreNorthingAtM: (x) => toY(valleyV(toU(x))),
    depthM: VALLEY.depthM,
  },
  quarry: {
    description: "Quarry cut into the ridge's south flank: flat floor, near-vertical north face, open to the south",
    ring: [utm(QUARRY.u0, QUARRY.v0), utm(QUARRY.u1, QUARRY.v0), utm(QUARRY.u1, QUARRY.v1), utm(QUARRY.u0, QUARRY.v1), utm(QUARRY.u0, QUARRY.v0)],
    floorM: QUARRY.floorM,
    /** The north face's centre (on the edge of the rectangle). */
    faceCentre: utm((QUARRY.u0 + QUARRY.u1) / 2, QUARRY.v1),
    /** Horizontal width over which the face drops to the floor. */
    edgeM: QUARRY.edgeM,
  },
  ravine: {
    description: "Narrow gorge cut through the ridge crest on a NW-SE line, flat floor, steep walls",
    /** Where the centre line crosses the ridge crest line: the deepest part. */
    crestCrossing: utm(RAVINE.crossU, RAVINE.crossV),
    direction: [RAVINE.dirU, RAVINE.dirV],
    floorAtCrossingM: RAVINE.floorAtCrossM,
    depthAtCrossingM: RAVINE.depthAtCrestM,
    floorHalfWidthM: RAVINE.floorHalfM,
    topHalfWidthM: RAVINE.topHalfM,
    floorGradient: RAVINE.floorGradient,
  },
  nodata: {
    description: "Lidar void over a pond in the valley floor: 30 m x 20 m of nodata cells",
    ring: [utm(VOID.u0, VOID.v0), utm(VOID.u1, VOID.v0), utm(VOID.u1, VOID.v1), utm(VOID.u0, VOID.v1), utm(VOID.u0, VOID.v0)],
    cells: (VOID.u1 - VOID.u0) * (VOID.v1 - VOID.v0),
  },
  site: {
    description: "Parcel boundary with a notch in the north edge (splits east-west strips) and an excluded yard",
    exterior: [
      [0, 15], [720, 0], [1500, 25], [1485, 640], [1500, 1000], [1010, 990], [1000, 790], [900, 795], [895, 985], [20, 1000], [0, 560], [0, 15],
    ].map(([u, v]) => utm(u, v)),
    /** The excluded yard, 80 m x 60 m, clockwise. */
    hole: [
      [160, 110], [160, 170], [240, 170], [240, 110], [160, 110],
    ].map(([u, v]) => utm(u, v)),
  },
});
