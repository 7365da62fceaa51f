/**
 * Defaults for camera timing the user may leave out. These are our
 * assumptions, not measured values: check them against the camera's data
 * sheet, because the exposure time sets the motion-blur speed limit and the
 * interval sets the photo-rate speed limit.
 */

/** 1/1000 s: a short exposure typical of mapping in daylight (assumption). */
export const DEFAULT_EXPOSURE_S = 1 / 1000;

/** 2 s between photos: a conservative figure for cameras writing large files to a card (assumption). */
export const DEFAULT_MIN_INTERVAL_S = 2;

/** Allowed motion blur in pixels: half a pixel to one pixel is the usual allowance (common practice). */
export const DEFAULT_BLUR_PX = 0.5;
