import proj4 from "proj4";

/** A bounding box in some CRS's units (degrees for geographic CRSs). */
export interface Bounds {
  west: number;
  south: number;
  east: number;
  north: number;
}

export const WGS84_PROJ4 = "+proj=longlat +datum=WGS84 +no_defs";

/**
 * Transforms a box between CRSs by sampling `perEdge` points along each edge
 * (edges of a box are curves in the other CRS), returning the box around them.
 * @example transformBounds({ west: 500000, south: 5200000, east: 501000, north: 5200800 }, "+proj=utm +zone=33 +datum=WGS84", WGS84_PROJ4)
 */
export function transformBounds(b: Bounds, fromProj4: string, toProj4: string, perEdge = 21): Bounds {
  const conv = proj4(fromProj4, toProj4);
  let west = Infinity, south = Infinity, east = -Infinity, north = -Infinity;
  const add = (x: number, y: number) => {
    const [u, v] = conv.forward([x, y]);
    if (!Number.isFinite(u) || !Number.isFinite(v)) return;
    if (u < west) west = u;
    if (u > east) east = u;
    if (v < south) south = v;
    if (v > north) north = v;
  };
  for (let i = 0; i < perEdge; i++) {
    const t = i / (perEdge - 1);
    const x = b.west + t * (b.east - b.west);
    const y = b.south + t * (b.north - b.south);
    add(x, b.south);
    add(x, b.north);
    add(b.west, y);
    add(b.east, y);
  }
  return { west, south, east, north };
}
