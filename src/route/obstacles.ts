import type { XY } from "../layout/types.js";
import { arcDeviationM, arcHalfStepRad, offsetCycles } from "./offsetCycles.js";
import { outlineOfCycles } from "./outline.js";
import { groupRings, polygonLeft } from "./rings.js";
import type { ArcOptions, BufferedZone, KeepOutZone } from "./types.js";

/**
 * A keep-out zone grown by its buffer, as polygons that contain the true buffer
 * (the Minkowski sum of the zone and a disc of radius bufferM) and lie within
 * bufferM + deviationM of the zone. Arcs are cut on circumscribed polygons
 * (offsetCycles.ts), so the outline errs outwards only; the deviation is the
 * smaller of `maxDeviationM` (0.5 m) and `maxDeviationShare` (2 %) of the buffer.
 *
 * A hole of the zone stays open ground only where it is wider than twice the
 * buffer: what remains is the hole shrunk by the buffer (it may split in parts
 * or vanish). Overlapping zones are not merged; every consumer treats a set of
 * buffered zones as their union (edgeGrid.ts).
 * @example
 * const z = bufferZone({ name: "mast", rings: [[[0, 0], [10, 0], [10, 10], [0, 10]]], bufferM: 20 });
 * z.polygons.length // 1: one outer ring, rounded corners, no holes
 */
export function bufferZone(zone: KeepOutZone, options: ArcOptions = {}): BufferedZone {
  if (!(zone.bufferM >= 0) || !Number.isFinite(zone.bufferM)) throw new RangeError(`keep-out zone ${zone.name}: bufferM must be a finite number >= 0, got ${zone.bufferM}`);
  const rings = polygonLeft(zone.rings);
  if (rings.length === 0) return { name: zone.name, bufferM: zone.bufferM, deviationM: 0, polygons: [] };
  if (zone.bufferM === 0) return { name: zone.name, bufferM: 0, deviationM: 0, polygons: [rings] };
  const deviationM = arcDeviationM(zone.bufferM, options);
  const half = arcHalfStepRad(zone.bufferM, deviationM);
  const cycles = offsetCycles(rings, zone.bufferM, half);
  const outline = outlineOfCycles(cycles);
  if (outline.unlinked > 0) throw new Error(`keep-out zone ${zone.name}: the buffered outline did not close (${outline.unlinked} vertices left over)`);
  // The excess actually reached: r / cos h - r for the widest half-step used (<= half).
  return { name: zone.name, bufferM: zone.bufferM, deviationM: zone.bufferM / Math.cos(half) - zone.bufferM, polygons: groupRings(outline.rings) };
}

/**
 * Every zone buffered (see bufferZone).
 * @example bufferZones([{ name: "road", rings: [[[0, 0], [100, 0], [100, 5], [0, 5]]], bufferM: 10 }])[0].bufferM // 10
 */
export function bufferZones(zones: readonly KeepOutZone[], options: ArcOptions = {}): BufferedZone[] {
  return zones.map((z) => bufferZone(z, options));
}

/**
 * All rings of buffered zones, each with its region on the left.
 * @example zoneRings(bufferZones(zones)).length // number of rings of all zones
 */
export function zoneRings(zones: readonly BufferedZone[]): XY[][] {
  return zones.flatMap((z) => z.polygons.flat());
}
