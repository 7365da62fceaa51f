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
}
