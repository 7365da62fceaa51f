/**
 * The cells with data of a DEM window: 1 where the height is a number, 0 where it is NaN
 * (nodata), for the few passes that take a mask (the unknown ground's polygons). Made when
 * asked for: a window holds its heights only (grid.ts).
 * @example dataMask(new Float32Array([1, NaN])) // Uint8Array [1, 0]
 */
export function dataMask(heights: Float32Array): Uint8Array {
  const mask = new Uint8Array(heights.length);
  for (let i = 0; i < heights.length; i++) mask[i] = heights[i] === heights[i] ? 1 : 0;
  return mask;
}

/**
 * Whether any cell of a DEM window has no data (a NaN height).
 * @example hasNodata(new Float32Array([1, NaN])) // true
 */
export function hasNodata(heights: Float32Array): boolean {
  for (let i = 0; i < heights.length; i++) if (heights[i] !== heights[i]) return true;
  return false;
}
