// The typed library API of gsdplan. The CLI in src/cli is a thin layer over these.
export * from "./errors.js";
export type * from "./dem/grid.js";
export type * from "./geo/frame.js";
export type * from "./camera/types.js";
export type * from "./layout/types.js";
export * from "./solve/types.js";
export type * from "./assess/types.js";
export * from "./assess/flags.js";
