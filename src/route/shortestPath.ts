import type { XY } from "../layout/types.js";
import { regionsBeside } from "./edgeGrid.js";
import { MinHeap } from "./heap.js";
import { indexObstacles, pointInsideAny, segmentEntersAny, type ObstacleIndex, type ObstacleOptions } from "./inside.js";
import { orient } from "./orient.js";
import type { BufferedZone } from "./types.js";

/**
 * Shortest transits around keep-out zones: a visibility graph over the zones'
 * corners searched with A*.
 *
 * Among polygonal obstacles a shortest path is a polyline whose inner vertices
 * are obstacle vertices (Lozano-Pérez and Wesley, "An algorithm for planning
 * collision-free paths among polyhedral obstacles", CACM 1979; de Berg et al.,
 * Computational Geometry, 3rd ed., ch. 15). It bends only around corners that
 * are convex towards the free space, and there both of its legs touch the
 * obstacle without entering it: each leg lies on a line that has the corner's
 * two neighbours on one side (the tangent or reduced visibility graph, Liu and
 * Arimoto, "Path planning using a tangent graph for mobile robots among
 * polygonal and curved obstacles", IJRR 1992; from memory). So the nodes are the
 * free convex corners and only tangent pairs are tested for visibility, once
 * per obstacle set. The legs from A and to B are tested lazily, when A* first
 * takes them, so a route costs a few visibility tests rather than one per node.
 */
export interface Router {
  /** Shortest polyline [a, ..., b] that stays out of every zone's interior and inside the bounds; null when none. */
  route(a: XY, b: XY): XY[] | null;
  index: ObstacleIndex;
  nodeCount: number;
  /** Visibility edges between nodes (each counted once). */
  edgeCount: number;
}

interface Nodes {
  x: Float64Array;
  y: Float64Array;
  /** The corner's neighbours along its ring. */
  px: Float64Array;
  py: Float64Array;
  qx: Float64Array;
  qy: Float64Array;
  n: number;
}

/**
 * A router over buffered zones (and optionally inside `bounds`); build it once
 * per obstacle set and route many transits.
 * @example
 * const router = makeRouter(bufferZones([{ name: "field", rings: [[[0, -10], [10, -10], [10, 10], [0, 10]]], bufferM: 0 }]));
 * router.route([-5, 0], [15, 2]) // [[-5, 0], [0, 10], [10, 10], [15, 2]]
 */
export function makeRouter(zones: readonly BufferedZone[], options: ObstacleOptions = {}): Router {
  const index = indexObstacles(zones, options);
  const nodes = freeConvexCorners(index);
  const adj = visibilityGraph(index, nodes);
  let edgeCount = 0;
  for (const list of adj) edgeCount += list.length / 2;
  return {
    index,
    nodeCount: nodes.n,
    edgeCount: edgeCount / 2,
    route: (a, b) => aStar(index, nodes, adj, a, b),
  };
}

/** Corners of the rings that are convex towards the free space and not covered by another region. */
function freeConvexCorners(index: ObstacleIndex): Nodes {
  const xs: number[][] = [[], [], [], [], [], []];
  for (const ring of index.rings) {
    const m = ring.length;
    for (let i = 0; i < m; i++) {
      const [px, py] = ring[(i + m - 1) % m];
      const [vx, vy] = ring[i];
      const [qx, qy] = ring[(i + 1) % m];
      const turn = orient(px, py, vx, vy, qx, qy);
      const l0 = Math.hypot(vx - px, vy - py);
      const l1 = Math.hypot(qx - vx, qy - vy);
      const forward = (vx - px) * (qx - vx) + (vy - py) * (qy - vy) > 0;
      if (turn < 0 || (turn === 0 && forward)) continue; // reflex or straight: never on a shortest path
      // Out of the corner: along the bisector away from the region (a spike's tip: straight on).
      let ux = (vx - px) / l0 - (qx - vx) / l1;
      let uy = (vy - py) / l0 - (qy - vy) / l1;
      if (turn === 0) {
        ux = (vx - px) / l0;
        uy = (vy - py) / l0;
      }
      if (index.base + regionsBeside(index.grid, vx, vy, ux, uy) > 0) continue;
      xs[0].push(vx);
      xs[1].push(vy);
      xs[2].push(px);
      xs[3].push(py);
      xs[4].push(qx);
      xs[5].push(qy);
    }
  }
  const f = xs.map((a) => Float64Array.from(a));
  return { x: f[0], y: f[1], px: f[2], py: f[3], qx: f[4], qy: f[5], n: f[0].length };
}

/** The line from (x, y) through node i leaves both of the node's neighbours on one side. */
function tangentAt(nodes: Nodes, i: number, x: number, y: number): boolean {
  const vx = nodes.x[i];
  const vy = nodes.y[i];
  if (vx === x && vy === y) return true;
  return orient(x, y, vx, vy, nodes.px[i], nodes.py[i]) * orient(x, y, vx, vy, nodes.qx[i], nodes.qy[i]) >= 0;
}

/** Adjacency per node as flat [neighbour, length, ...] lists. */
function visibilityGraph(index: ObstacleIndex, nodes: Nodes): number[][] {
  const adj: number[][] = Array.from({ length: nodes.n }, () => []);
  const { x, y, n } = nodes;
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      if (x[i] === x[j] && y[i] === y[j]) continue;
      if (!tangentAt(nodes, i, x[j], y[j]) || !tangentAt(nodes, j, x[i], y[i])) continue;
      if (segmentEntersAny(index, [x[i], y[i]], [x[j], y[j]])) continue;
      const d = Math.hypot(x[j] - x[i], y[j] - y[i]);
      adj[i].push(j, d);
      adj[j].push(i, d);
    }
  }
  return adj;
}

/**
 * A* (Hart, Nilsson and Raphael, 1968) with the straight-line distance to b,
 * which never overestimates, so the first time b is taken its path is shortest.
 * Legs from a and to b enter the queue untested and are tested when taken.
 */
function aStar(index: ObstacleIndex, nodes: Nodes, adj: number[][], a: XY, b: XY): XY[] | null {
  if (pointInsideAny(index, a) || pointInsideAny(index, b)) return null;
  if (!segmentEntersAny(index, a, b)) return [[a[0], a[1]], [b[0], b[1]]];
  const n = nodes.n;
  const A = n;
  const B = n + 1;
  const at = (v: number): XY => (v === A ? [a[0], a[1]] : v === B ? [b[0], b[1]] : [nodes.x[v], nodes.y[v]]);
  const h = (v: number) => (v === B ? 0 : Math.hypot(nodes.x[v] - b[0], nodes.y[v] - b[1]));
  const best = new Float64Array(n + 2).fill(Infinity);
  const parent = new Int32Array(n + 2).fill(-1);
  const done = new Uint8Array(n + 2);
  // Queue entries: node, path length, parent, untested leg.
  const eNode: number[] = [];
  const eG: number[] = [];
  const eFrom: number[] = [];
  const eLazy: number[] = [];
  const heap = new MinHeap();
  const push = (v: number, g: number, from: number, lazy: number) => {
    eNode.push(v);
    eG.push(g);
    eFrom.push(from);
    eLazy.push(lazy);
    heap.push(eNode.length - 1, g + h(v));
  };
  for (let v = 0; v < n; v++) if (tangentAt(nodes, v, a[0], a[1])) push(v, Math.hypot(nodes.x[v] - a[0], nodes.y[v] - a[1]), A, 1);
  while (heap.size > 0) {
    const e = heap.pop();
    const v = eNode[e];
    if (done[v]) continue;
    const from = eFrom[e];
    if (eLazy[e] && segmentEntersAny(index, at(from), at(v))) continue;
    done[v] = 1;
    parent[v] = from;
    const g = eG[e];
    if (v === B) return path(parent, B, A, at);
    const list = adj[v];
    for (let k = 0; k < list.length; k += 2) {
      const w = list[k];
      const gw = g + list[k + 1];
      if (done[w] || gw >= best[w]) continue;
      best[w] = gw;
      push(w, gw, v, 0);
    }
    if (tangentAt(nodes, v, b[0], b[1])) push(B, g + Math.hypot(b[0] - nodes.x[v], b[1] - nodes.y[v]), v, 1);
  }
  return null;
}

function path(parent: Int32Array, end: number, start: number, at: (v: number) => XY): XY[] {
  const out: XY[] = [];
  for (let v = end; v !== -1; v = v === start ? -1 : parent[v]) out.push(at(v));
  return out.reverse();
}
