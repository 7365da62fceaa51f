/** Types for scripts/demo-terrain.mjs (plain ESM, so TypeScript tests can import it). */

export declare const SITE_NAME: string;
export declare const SLUG: string;
export declare const EPSG_HORIZONTAL: number;
export declare const EPSG_VERTICAL: number;
export declare const NODATA: number;
export declare const SITE_ORIGIN: { eastingM: number; northingM: number };
export declare const SITE_SIZE: { widthM: number; heightM: number };
export declare const DEM_WINDOW: Readonly<{ marginM: number; cellM: number; width: number; height: number; x0: number; y0: number }>;

export declare function valueNoise(x: number, y: number, seed: number): number;
export declare function naturalHeightM(x: number, y: number): number;
export declare function terrainHeightM(x: number, y: number): number;
export declare function demValueM(x: number, y: number): number;
export declare function demHeights(): Float32Array;
export declare function ridgeCrestNorthingM(x: number): number;
export declare function ravineCentreLine(x: number, y: number): { x: number; y: number; s: number; floorM: number };

type XY = [number, number];

export declare const FEATURES: Readonly<{
  ridge: { description: string; crestNorthingAtM: (x: number) => number; reliefAboveBaseM: [number, number]; sigmaM: number };
  valley: { description: string; centreNorthingAtM: (x: number) => number; depthM: number };
  quarry: { description: string; ring: XY[]; floorM: number; faceCentre: XY; edgeM: number };
  ravine: {
    description: string;
    crestCrossing: XY;
    direction: XY;
    floorAtCrossingM: number;
    depthAtCrossingM: number;
    floorHalfWidthM: number;
    topHalfWidthM: number;
    floorGradient: number;
  };
  nodata: { description: string; ring: XY[]; cells: number };
  site: { description: string; exterior: XY[]; hole: XY[] };
}>;
