/**
 * A local equirectangular frame for geographic DEMs: x = N0 cos(phi0) (lambda - lambda0),
 * y = M0 (phi - phi0), with M0 and N0 the meridional and prime-vertical radii of the
 * DEM's own ellipsoid at the site's latitude phi0.
 *
 * Why a projection of our own: in this frame a longitude/latitude grid stays a regular
 * north-up grid (each axis is an affine function of one angle), so the DEM's cells are
 * used as they are, never resampled. Resampling a geographic DEM into UTM and then
 * interpolating again smooths ridges away (metres on a 3-arc-second DEM of steep
 * terrain); here the ground between cell centres is exactly the DEM's bilinear surface,
 * the one GDAL's `gdallocationinfo -r bilinear` samples in the file's own degrees. The
 * frame is true to scale at the site centre; east-west scale drifts by about
 * tan(phi0) * (phi - phi0) away from it (0.07 % 2.5 km from the centre at 60 degrees),
 * which the frame chooser checks over the whole window. proj4 has `eqc`, but only on a
 * sphere of the semi-major axis (0.3-0.7 % off north-south), hence this small one.
 */
import proj4 from "proj4";

/** The proj4 projection name, registered once by `registerLocalEquirectangular`. */
export const LOCAL_EQC = "gsdplan_local_eqc";

interface ProjThis {
  a: number;
  es: number;
  lat0: number;
  long0: number;
  x0: number;
  y0: number;
  kx: number;
  ky: number;
}

let registered = false;

/**
 * Makes `+proj=gsdplan_local_eqc` known to proj4 (idempotent).
 * @example registerLocalEquirectangular(); proj4("WGS84", localEquirectangularDef(7, 46.5, "+datum=WGS84"))
 */
export function registerLocalEquirectangular(): void {
  if (registered) return;
  registered = true;
  proj4.Proj.projections.add({
    names: [LOCAL_EQC],
    init(this: ProjThis) {
      this.x0 = this.x0 || 0;
      this.y0 = this.y0 || 0;
      this.lat0 = this.lat0 || 0;
      this.long0 = this.long0 || 0;
      const [m, n] = radiiAt(this.a, this.es, this.lat0);
      this.kx = n * Math.cos(this.lat0);
      this.ky = m;
    },
    forward(this: ProjThis, p: { x: number; y: number }) {
      p.x = this.x0 + this.kx * wrapPi(p.x - this.long0);
      p.y = this.y0 + this.ky * (p.y - this.lat0);
      return p;
    },
    inverse(this: ProjThis, p: { x: number; y: number }) {
      p.x = wrapPi(this.long0 + (p.x - this.x0) / this.kx);
      p.y = this.lat0 + (p.y - this.y0) / this.ky;
      return p;
    },
  } as unknown as Parameters<typeof proj4.Proj.projections.add>[0], 0);
}

/**
 * Meridional and prime-vertical radii [M, N] of an ellipsoid (semi-major axis a,
 * squared eccentricity es) at a latitude in radians (any geodesy text, from memory):
 * M = a(1-e^2)/(1-e^2 sin^2 phi)^1.5, N = a/(1-e^2 sin^2 phi)^0.5.
 * @example radiiAt(6378137, 0.00669437999014, 0) // [6335439.327..., 6378137]
 */
export function radiiAt(a: number, es: number, latRad: number): [number, number] {
  const s = Math.sin(latRad);
  const w = 1 - es * s * s;
  return [(a * (1 - es)) / (w * Math.sqrt(w)), a / Math.sqrt(w)];
}

/**
 * The frame's proj4 definition at (lon0, lat0) degrees, on the datum given by
 * `datumTokens` (the geographic DEM's own `+datum`/`+ellps`/`+towgs84` tokens).
 * @example localEquirectangularDef(7, 46.5, "+datum=WGS84")
 */
export function localEquirectangularDef(lon0Deg: number, lat0Deg: number, datumTokens: string): string {
  return `+proj=${LOCAL_EQC} +lat_0=${lat0Deg} +lon_0=${lon0Deg} +x_0=0 +y_0=0 ${datumTokens.trim()} +units=m +no_defs`.replace(/\s+/g, " ");
}

/**
 * Metres per degree [east, north] of the frame (its affine scale on the DEM's degrees).
 * @example degreeScalesM("+proj=gsdplan_local_eqc +lat_0=0 +lon_0=0 +datum=WGS84") // [111319.49..., 110574.27...]
 */
export function degreeScalesM(def: string): [number, number] {
  registerLocalEquirectangular();
  const p = new proj4.Proj(def) as unknown as ProjThis;
  const [m, n] = radiiAt(p.a, p.es, p.lat0);
  const rad = Math.PI / 180;
  return [n * Math.cos(p.lat0) * rad, m * rad];
}

function wrapPi(a: number): number {
  if (a >= -Math.PI && a <= Math.PI) return a;
  return a - 2 * Math.PI * Math.floor((a + Math.PI) / (2 * Math.PI));
}
