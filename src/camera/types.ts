/** A nadir mapping camera, reduced to what the geometry needs. */
export interface Camera {
  imageWidthPx: number;
  imageHeightPx: number;
  /**
   * Instantaneous field of view of one pixel at the image centre: pixel pitch
   * over focal length (p / f), dimensionless. Nadir GSD = height * ifov.
   */
  ifov: number;
  /** Present when the camera was given by sensor size and focal length. */
  sensorWidthMm?: number;
  sensorHeightMm?: number;
  focalLengthMm?: number;
  /** Horizontal (image-width) field of view, degrees. */
  hfovDeg: number;
  /** Exposure time in seconds (for motion blur). */
  exposureS: number;
  /** Minimum interval between photos in seconds. */
  minIntervalS: number;
  /** false: long side (width) across the track, the usual mapping layout. */
  portrait: boolean;
}

/** The detail the customer asked for, as a GSD band in metres per pixel. */
export interface Requirement {
  targetGsdM: number;
  /** target * (1 - tolerance) */
  lowGsdM: number;
  /** target * (1 + tolerance) */
  highGsdM: number;
  /** Fraction in (0, 1). */
  tolerance: number;
  /** How the target was derived, in words, for the summary. */
  derivation: string;
}
