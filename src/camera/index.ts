// The camera stage: camera model, GSD requirement, overlap spacing, ground speed.
export type * from "./types.js";
export * from "./defaults.js";
export * from "./fov.js";
export * from "./makeCamera.js";
export * from "./gsd.js";
export * from "./offNadir.js";
export * from "./overlap.js";
export * from "./requirement.js";
export * from "./speed.js";
