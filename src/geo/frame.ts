/**
 * A metric working frame for one site: every distance, strip and station of
 * layout, solve and assess is in this frame's metres (x east, y north).
 */
export interface LocalFrame {
  /** proj4 definition of the frame (UTM zone of the site, or the DEM's own metric CRS). */
  proj4: string;
  epsg: number | null;
  name: string;
  /** WGS84 longitude/latitude (degrees) to frame x/y (metres). */
  fromWgs84(lon: number, lat: number): [number, number];
  /** Frame x/y (metres) to WGS84 longitude/latitude (degrees). */
  toWgs84(x: number, y: number): [number, number];
  /**
   * When the DEM's own CRS maps onto the frame by a scale and shift per axis
   * (x = ox + sx * X, y = oy + sy * Y for DEM coordinates X, Y), the DEM's
   * cells are used as they are: no resampling, the ground between cell
   * centres is the DEM's own bilinear surface. Absent when the DEM must be
   * resampled onto the frame.
   */
  fromNative?: NativeAffine;
}

/** Per-axis affine map from the DEM's CRS coordinates to frame metres. */
export interface NativeAffine {
  sx: number;
  sy: number;
  ox: number;
  oy: number;
  /** For a geographic DEM, the frame's central longitude (degrees): DEM longitudes are taken in the wrap nearest it. */
  lon0Deg?: number;
}
