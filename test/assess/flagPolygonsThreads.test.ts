import { describe, it, expect } from "vitest";
import { builtModule } from "../helpers/dist.js";
import { flagPolygons, type flagPolygonsInBackground as InBackground } from "../../src/assess/flagPolygons.js";
import { localFrameFor } from "../../src/geo/localFrame.js";
import type { CrsInfo } from "../../src/dem/grid.js";

const built = builtModule("assess/flagPolygons.js", ["flagPolygonsWorker.js"]);
const WGS84 = "+proj=longlat +datum=WGS84 +no_defs";

describe.skipIf(!built.available)("flag polygons traced on a worker thread", () => {
  // A UTM frame, and a geographic DEM's local equirectangular frame (a projection of our own,
  // which the worker must register before proj4 knows it).
  const frames = {
    utm: localFrameFor(15.2, 52.1),
    "local equirectangular": localFrameFor(7.45, 46.55, { proj4: WGS84, epsg: 4326, name: "WGS 84", geographic: true, linearUnitM: Number.NaN } satisfies CrsInfo, { west: 7.42, east: 7.48, south: 46.52, north: 46.58 }),
  };
  for (const [label, frame] of Object.entries(frames)) {
    it(`are the polygons traced on this thread (${label} frame)`, async () => {
      const { flagPolygonsInBackground } = (await import(built.href)) as { flagPolygonsInBackground: typeof InBackground };
      const W = 900, H = 700;
      const flags = new Uint16Array(new SharedArrayBuffer(2 * W * H));
      // Coarse (1) in a disc, too few images (4) in a ring crossing it, the ceiling cause (8) in a band.
      for (let r = 0; r < H; r++) for (let c = 0; c < W; c++) {
        const d = Math.hypot(c - 300, r - 300);
        let f = 0;
        if (d < 120) f |= 1;
        if (d > 150 && d < 190) f |= 4;
        if (c > 600 && c < 640 && r % 50 < 35) f |= 8;
        flags[r * W + c] = f;
      }
      const transform = { x0: 1000, y0: 2000, dx: 0.5, dy: -0.5 };
      const here = flagPolygons(flags, W, H, transform, frame.toWgs84, 0.25);
      expect(Object.keys(here).sort()).toEqual(["ceiling", "coarse", "fewImages"].sort());
      const made = await flagPolygonsInBackground({ flags, width: W, height: H, transform, frame: { proj4: frame.proj4, epsg: frame.epsg, name: frame.name }, cellAreaM2: 0.25 }, 2).result();
      expect(made).toBeDefined();
      expect(made).toEqual(here);
    });
  }

  it("starts no worker when nothing is flagged, and one for a single flagged cell", async () => {
    const { flagPolygonsInBackground } = (await import(built.href)) as { flagPolygonsInBackground: typeof InBackground };
    const W = 900, H = 700;
    const frame = frames.utm;
    const job = (flags: Uint16Array) => ({ flags, width: W, height: H, transform: { x0: 0, y0: 0, dx: 0.5, dy: -0.5 }, frame: { proj4: frame.proj4, epsg: frame.epsg, name: frame.name }, cellAreaM2: 0.25 });
    const flags = new Uint16Array(new SharedArrayBuffer(2 * W * H));
    // No worker ran: result() gives undefined and the caller traces (nothing) itself.
    expect(await flagPolygonsInBackground(job(flags), 2).result()).toBeUndefined();
    flags[W * H - 1] = 2;
    const made = await flagPolygonsInBackground(job(flags), 2).result();
    expect(made).toBeDefined();
    expect(made!.fine?.properties.areaM2).toBe(0.25);
  });
});
