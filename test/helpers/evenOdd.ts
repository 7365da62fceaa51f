/**
 * Whether (x, y) is inside polygons drawn with the even-odd rule over all their rings (SVG
 * fill-rule evenodd, as the report draws block outlines): a crossing count over every edge.
 * Rings are closed (the last point repeats the first).
 * @example insideEvenOdd([[[[0, 0], [2, 0], [2, 2], [0, 2], [0, 0]]]], 1, 1) // true
 */
export function insideEvenOdd(polys: readonly (readonly (readonly (readonly number[])[])[])[], x: number, y: number): boolean {
  let inside = false;
  for (const poly of polys)
    for (const ring of poly)
      for (let i = 0, j = ring.length - 2; i < ring.length - 1; j = i++) {
        const [xi, yi] = ring[i], [xj, yj] = ring[j];
        if (yi > y !== yj > y && x < ((xj - xi) * (y - yi)) / (yj - yi) + xi) inside = !inside;
      }
  return inside;
}
