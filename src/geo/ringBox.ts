/**
 * The bounding box [minX, minY, maxX, maxY] of a ring's (or any list's) points.
 * @example ringBox([[0, 0], [4, 1], [2, 3]]) // [0, 0, 4, 3]
 */
export function ringBox(points: readonly (readonly number[])[]): [number, number, number, number] {
  const b: [number, number, number, number] = [Infinity, Infinity, -Infinity, -Infinity];
  for (const [x, y] of points) {
    if (x < b[0]) b[0] = x;
    if (y < b[1]) b[1] = y;
    if (x > b[2]) b[2] = x;
    if (y > b[3]) b[3] = y;
  }
  return b;
}
