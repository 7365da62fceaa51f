// The geo stage: local metric frame, WGS84 transforms, geoid undulation.
export type * from "./frame.js";
export * from "./longitude.js";
export * from "./utmZone.js";
export * from "./scaleFactor.js";
export { localFrameFor, frameFromProj4, toWgs84Many, fromWgs84Many, MAX_FRAME_SCALE_ERROR, type SiteFrame } from "./localFrame.js";
export * from "./geoid.js";
