import { InputFileError } from "../errors.js";
import { epsgEntry } from "./epsg.js";
import { angularUnitDegrees, lengthUnit, type LengthUnit } from "./units.js";

/** The GeoKeys as geotiff.js parses them (key name -> number, string or number array). */
export type GeoKeys = Partial<Record<string, unknown>>;

/** GeoTIFF "user-defined" code (GeoTIFF 1.0 spec, section 6.3). */
export const USER_DEFINED = 32767;

// ProjCoordTransGeoKey codes (GeoTIFF 1.0 spec, section 6.3.3.3; OGC GeoTIFF 1.1 annex).
const CT = {
  TransverseMercator: 1,
  Mercator: 7,
  LambertConfConic_2SP: 8,
  LambertConfConic_1SP: 9,
  LambertAzimEqualArea: 10,
  AlbersEqualArea: 11,
  Stereographic: 14,
  PolarStereographic: 15,
  ObliqueStereographic: 16,
  Equirectangular: 17,
} as const;

// Ellipsoids by EPSG code, for files that give only GeogEllipsoidGeoKey. GDAL also
// writes the semi-axes, which take precedence; this short list covers the rest.
// Names are proj4's built-in ellipsoids (values from the EPSG dataset).
const ELLIPSOIDS: Record<number, string> = {
  7001: "airy",
  7002: "mod_airy",
  7004: "bessel",
  7008: "clrk66",
  7012: "clrk80",
  7019: "GRS80",
  7022: "intl",
  7024: "krass",
  7030: "WGS84",
  7043: "WGS72",
};

function num(keys: GeoKeys, name: string): number | undefined {
  const v = keys[name];
  return typeof v === "number" && Number.isFinite(v) ? v : undefined;
}

function numArray(keys: GeoKeys, name: string): number[] | undefined {
  const v = keys[name] as ArrayLike<number> | number | undefined;
  if (v === undefined || v === null) return undefined;
  if (typeof v === "number") return [v];
  return Array.from(v as ArrayLike<number>);
}

/** Datum / ellipsoid tokens (+datum, +ellps, +a, +b, +rf, +towgs84, +nadgrids, +pm) of a proj4 string. */
export function datumTokens(proj4: string): string {
  return proj4
    .split(/\s+/)
    .filter((t) => /^\+(datum|ellps|a|b|rf|towgs84|nadgrids|pm)=/.test(t))
    .join(" ");
}

/**
 * The geodetic part (datum or ellipsoid) of a user-defined CRS as proj4 tokens, from
 * GeographicTypeGeoKey, GeogGeodeticDatumGeoKey, the semi-axis keys or GeogEllipsoidGeoKey.
 * @example geodeticProj4({ GeographicTypeGeoKey: 4326 }, "a.tif") // "+datum=WGS84"
 */
export function geodeticProj4(keys: GeoKeys, file: string): string {
  const geog = num(keys, "GeographicTypeGeoKey");
  if (geog !== undefined && geog !== USER_DEFINED) {
    const e = epsgEntry(geog);
    if (!e || !/GEOG/.test(e.kind)) throw new InputFileError(file, `unknown EPSG geographic CRS code ${geog} in GeographicTypeGeoKey`);
    return datumTokens(e.proj4);
  }
  const datum = num(keys, "GeogGeodeticDatumGeoKey");
  if (datum !== undefined && datum !== USER_DEFINED) {
    // EPSG convention for the classic range: geodetic datum 6xxx <-> geographic CRS 4xxx.
    const e = datum >= 6001 && datum <= 6999 ? epsgEntry(datum - 2000) : null;
    if (e && /GEOG/.test(e.kind)) return datumTokens(e.proj4);
  }
  const parts: string[] = [];
  const a = num(keys, "GeogSemiMajorAxisGeoKey");
  const b = num(keys, "GeogSemiMinorAxisGeoKey");
  const rf = num(keys, "GeogInvFlatteningGeoKey");
  const ellCode = num(keys, "GeogEllipsoidGeoKey");
  if (a !== undefined && (rf !== undefined || b !== undefined)) {
    parts.push(`+a=${a}`, rf !== undefined && rf > 0 ? `+rf=${rf}` : `+b=${b ?? a}`);
  } else if (ellCode !== undefined && ELLIPSOIDS[ellCode]) {
    parts.push(`+ellps=${ELLIPSOIDS[ellCode]}`);
  } else {
    throw new InputFileError(file, "user-defined CRS without a known ellipsoid (GeogEllipsoidGeoKey / semi-axis keys)");
  }
  const towgs84 = numArray(keys, "GeogTOWGS84GeoKey");
  if (towgs84 && (towgs84.length === 3 || towgs84.length === 7)) parts.push(`+towgs84=${towgs84.join(",")}`);
  const pm = num(keys, "GeogPrimeMeridianLongGeoKey");
  if (pm) parts.push(`+pm=${pm}`);
  return parts.join(" ");
}

/** Linear unit of a projected CRS from ProjLinearUnitsGeoKey / ProjLinearUnitSizeGeoKey (default metre). */
export function projLinearUnit(keys: GeoKeys, file: string): LengthUnit {
  const code = num(keys, "ProjLinearUnitsGeoKey");
  if (code === undefined) return lengthUnit(9001)!;
  if (code === USER_DEFINED) {
    const size = num(keys, "ProjLinearUnitSizeGeoKey");
    if (size && size > 0) return { name: `${size} m`, metres: size };
  }
  const u = lengthUnit(code);
  if (!u) throw new InputFileError(file, `unsupported linear unit code ${code} in ProjLinearUnitsGeoKey (supported: 9001 metre, 9002 foot, 9003 US survey foot, 9005, 9036)`);
  return u;
}

function unitsToken(u: LengthUnit): string {
  return u.proj4Units ? `+units=${u.proj4Units}` : `+to_meter=${u.metres}`;
}

/**
 * proj4 definition of a user-defined projected CRS (ProjectedCSTypeGeoKey = 32767) from
 * ProjectionGeoKey (EPSG UTM conversions) or ProjCoordTransGeoKey and its parameter keys.
 * False eastings/northings are in the projection's linear unit (GeoTIFF 1.0 spec 2.5.3.3)
 * and become metres for proj4's +x_0/+y_0.
 * @example userDefinedProj4({ ProjCoordTransGeoKey: 1, ... }, "a.tif").method // "Transverse Mercator"
 */
export function userDefinedProj4(keys: GeoKeys, file: string): { proj4: string; method: string; unit: LengthUnit } {
  const unit = projLinearUnit(keys, file);
  const geod = geodeticProj4(keys, file);
  const tail = `${geod} ${unitsToken(unit)} +no_defs`;

  const projection = num(keys, "ProjectionGeoKey");
  if (projection !== undefined && projection !== USER_DEFINED) {
    // EPSG conversion codes 16001-16060 = UTM zone N north, 16101-16160 = UTM zone N south.
    if (projection >= 16001 && projection <= 16060) return { proj4: `+proj=utm +zone=${projection - 16000} ${tail}`, method: "UTM north", unit };
    if (projection >= 16101 && projection <= 16160) return { proj4: `+proj=utm +zone=${projection - 16100} +south ${tail}`, method: "UTM south", unit };
    if (num(keys, "ProjCoordTransGeoKey") === undefined)
      throw new InputFileError(file, `unsupported EPSG projection code ${projection} in ProjectionGeoKey (UTM conversions 16001-16160, or a ProjCoordTransGeoKey, are supported)`);
  }

  const ct = num(keys, "ProjCoordTransGeoKey");
  if (ct === undefined) throw new InputFileError(file, "user-defined projected CRS without ProjCoordTransGeoKey");
  const degPerUnit = angularUnitDegrees(num(keys, "GeogAngularUnitsGeoKey"));
  if (degPerUnit === null) throw new InputFileError(file, `unsupported angular unit code ${num(keys, "GeogAngularUnitsGeoKey")}`);
  const ang = (...names: string[]): number | undefined => {
    for (const n of names) {
      const v = num(keys, n);
      if (v !== undefined) return v * degPerUnit;
    }
    return undefined;
  };
  const lin = (...names: string[]): number => {
    for (const n of names) {
      const v = num(keys, n);
      if (v !== undefined) return v * unit.metres;
    }
    return 0;
  };
  const sc = (...names: string[]): number => {
    for (const n of names) {
      const v = num(keys, n);
      if (v !== undefined) return v;
    }
    return 1;
  };
  const fe = lin("ProjFalseEastingGeoKey", "ProjFalseOriginEastingGeoKey", "ProjCenterEastingGeoKey");
  const fn = lin("ProjFalseNorthingGeoKey", "ProjFalseOriginNorthingGeoKey", "ProjCenterNorthingGeoKey");
  const p = (name: string, v: number | undefined) => (v === undefined ? "" : ` +${name}=${v}`);
  const xy = ` +x_0=${fe} +y_0=${fn}`;
  const need = (v: number | undefined, what: string): number => {
    if (v === undefined) throw new InputFileError(file, `user-defined projection is missing ${what}`);
    return v;
  };

  switch (ct) {
    case CT.TransverseMercator:
      return {
        method: "Transverse Mercator",
        unit,
        proj4: `+proj=tmerc${p("lat_0", ang("ProjNatOriginLatGeoKey") ?? 0)}${p("lon_0", need(ang("ProjNatOriginLongGeoKey", "ProjCenterLongGeoKey"), "ProjNatOriginLongGeoKey"))} +k_0=${sc("ProjScaleAtNatOriginGeoKey", "ProjScaleAtCenterGeoKey")}${xy} ${tail}`,
      };
    case CT.Mercator: {
      const latTs = ang("ProjStdParallel1GeoKey");
      return {
        method: "Mercator",
        unit,
        proj4: `+proj=merc${p("lon_0", ang("ProjNatOriginLongGeoKey", "ProjCenterLongGeoKey") ?? 0)}${latTs !== undefined ? p("lat_ts", latTs) : ` +k_0=${sc("ProjScaleAtNatOriginGeoKey")}`}${xy} ${tail}`,
      };
    }
    case CT.LambertConfConic_2SP: {
      // GDAL writes the false-origin keys; older writers used the natural-origin ones.
      const fe2 = lin("ProjFalseOriginEastingGeoKey", "ProjFalseEastingGeoKey");
      const fn2 = lin("ProjFalseOriginNorthingGeoKey", "ProjFalseNorthingGeoKey");
      return {
        method: "Lambert Conic Conformal (2SP)",
        unit,
        proj4: `+proj=lcc${p("lat_1", need(ang("ProjStdParallel1GeoKey"), "ProjStdParallel1GeoKey"))}${p("lat_2", need(ang("ProjStdParallel2GeoKey"), "ProjStdParallel2GeoKey"))}${p("lat_0", ang("ProjFalseOriginLatGeoKey", "ProjNatOriginLatGeoKey") ?? 0)}${p("lon_0", ang("ProjFalseOriginLongGeoKey", "ProjNatOriginLongGeoKey") ?? 0)} +x_0=${fe2} +y_0=${fn2} ${tail}`,
      };
    }
    case CT.LambertConfConic_1SP: {
      const lat0 = need(ang("ProjNatOriginLatGeoKey"), "ProjNatOriginLatGeoKey");
      return {
        method: "Lambert Conic Conformal (1SP)",
        unit,
        proj4: `+proj=lcc +lat_1=${lat0} +lat_0=${lat0}${p("lon_0", ang("ProjNatOriginLongGeoKey") ?? 0)} +k_0=${sc("ProjScaleAtNatOriginGeoKey")}${xy} ${tail}`,
      };
    }
    case CT.LambertAzimEqualArea:
      return {
        method: "Lambert Azimuthal Equal Area",
        unit,
        proj4: `+proj=laea${p("lat_0", ang("ProjCenterLatGeoKey", "ProjNatOriginLatGeoKey") ?? 0)}${p("lon_0", ang("ProjCenterLongGeoKey", "ProjNatOriginLongGeoKey") ?? 0)}${xy} ${tail}`,
      };
    case CT.AlbersEqualArea:
      return {
        method: "Albers Equal Area",
        unit,
        proj4: `+proj=aea${p("lat_1", need(ang("ProjStdParallel1GeoKey"), "ProjStdParallel1GeoKey"))}${p("lat_2", need(ang("ProjStdParallel2GeoKey"), "ProjStdParallel2GeoKey"))}${p("lat_0", ang("ProjFalseOriginLatGeoKey", "ProjNatOriginLatGeoKey", "ProjCenterLatGeoKey") ?? 0)}${p("lon_0", ang("ProjFalseOriginLongGeoKey", "ProjNatOriginLongGeoKey", "ProjCenterLongGeoKey") ?? 0)}${xy} ${tail}`,
      };
    case CT.Stereographic:
      return {
        method: "Stereographic",
        unit,
        proj4: `+proj=stere${p("lat_0", ang("ProjCenterLatGeoKey", "ProjNatOriginLatGeoKey") ?? 0)}${p("lon_0", ang("ProjCenterLongGeoKey", "ProjNatOriginLongGeoKey") ?? 0)} +k_0=${sc("ProjScaleAtNatOriginGeoKey", "ProjScaleAtCenterGeoKey")}${xy} ${tail}`,
      };
    case CT.PolarStereographic: {
      // ProjNatOriginLatGeoKey is +-90 for variant A (scale at the pole) and the latitude of
      // true scale for variant B, as GDAL writes and reads it.
      const lat = need(ang("ProjNatOriginLatGeoKey"), "ProjNatOriginLatGeoKey");
      const lon0 = ang("ProjStraightVertPoleLongGeoKey", "ProjNatOriginLongGeoKey") ?? 0;
      const pole = lat < 0 ? -90 : 90;
      const variant = Math.abs(Math.abs(lat) - 90) < 1e-9 ? ` +k_0=${sc("ProjScaleAtNatOriginGeoKey")}` : ` +lat_ts=${lat}`;
      return { method: "Polar Stereographic", unit, proj4: `+proj=stere +lat_0=${pole}${variant} +lon_0=${lon0}${xy} ${tail}` };
    }
    case CT.ObliqueStereographic:
      return {
        method: "Oblique Stereographic",
        unit,
        proj4: `+proj=sterea${p("lat_0", need(ang("ProjNatOriginLatGeoKey", "ProjCenterLatGeoKey"), "ProjNatOriginLatGeoKey"))}${p("lon_0", ang("ProjNatOriginLongGeoKey", "ProjCenterLongGeoKey") ?? 0)} +k_0=${sc("ProjScaleAtNatOriginGeoKey", "ProjScaleAtCenterGeoKey")}${xy} ${tail}`,
      };
    case CT.Equirectangular:
      return {
        method: "Equirectangular",
        unit,
        proj4: `+proj=eqc${p("lat_ts", ang("ProjStdParallel1GeoKey") ?? 0)}${p("lat_0", ang("ProjNatOriginLatGeoKey", "ProjCenterLatGeoKey") ?? 0)}${p("lon_0", ang("ProjNatOriginLongGeoKey", "ProjCenterLongGeoKey") ?? 0)}${xy} ${tail}`,
      };
    default:
      throw new InputFileError(
        file,
        `unsupported user-defined projection (ProjCoordTransGeoKey ${ct}); supported: Transverse Mercator, Mercator, Lambert Conformal Conic 1SP/2SP, Lambert Azimuthal Equal Area, Albers, Stereographic, Polar Stereographic, Oblique Stereographic, Equirectangular`,
      );
  }
}
