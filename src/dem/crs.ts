import { InputError, InputFileError } from "../errors.js";
import type { CrsInfo, VerticalDatum } from "./grid.js";
import { epsgEntry } from "./epsg.js";
import { lengthUnit, lengthUnitByName } from "./units.js";
import { USER_DEFINED, geodeticProj4, userDefinedProj4, type GeoKeys } from "./userdefined.js";

export type { GeoKeys } from "./userdefined.js";

/** Metres per horizontal unit from a proj4 string's +units / +to_meter (1 when absent). */
export function proj4LinearUnitM(proj4: string): number {
  const toMeter = /\+to_meter=([-0-9.eE+]+)/.exec(proj4);
  if (toMeter) return Number(toMeter[1]);
  const units = /\+units=(\S+)/.exec(proj4);
  if (!units) return 1;
  const map: Record<string, number> = { m: 1, km: 1000, ft: 0.3048, "us-ft": 1200 / 3937, "ind-ft": 0.30479841, yd: 0.9144, "us-yd": 3600 / 3937 };
  return map[units[1]] ?? NaN;
}

/**
 * CRS of an EPSG code, through epsg-index. Throws InputFileError for codes that are
 * unknown or not horizontal (e.g. a vertical CRS).
 * @example crsFromEpsg(32633, "a.tif").name // "WGS 84 / UTM zone 33N"
 */
export function crsFromEpsg(code: number, file: string, key = "ProjectedCSTypeGeoKey"): CrsInfo {
  const e = epsgEntry(code);
  if (!e) throw new InputFileError(file, `unknown EPSG code ${code} in ${key} (not in the EPSG dataset)`);
  const geographic = /GEOG/.test(e.kind) || /\+proj=longlat/.test(e.proj4);
  if (!geographic && !/PROJCRS/.test(e.kind)) throw new InputFileError(file, `EPSG code ${code} in ${key} is a ${e.kind}, not a horizontal CRS`);
  const proj4 = e.proj4.replace(/\s*\+type=crs/, "").trim();
  return { proj4, epsg: code, name: e.name, geographic, linearUnitM: geographic ? NaN : proj4LinearUnitM(proj4) };
}

/**
 * Horizontal CRS from the GeoKeys: EPSG-coded projected or geographic CRS, or a
 * user-defined projection built from the individual keys.
 * @example horizontalCrs({ GTModelTypeGeoKey: 1, ProjectedCSTypeGeoKey: 32633 }, "a.tif").epsg // 32633
 */
export function horizontalCrs(keys: GeoKeys, file: string): CrsInfo {
  const model = keys.GTModelTypeGeoKey as number | undefined;
  const pcs = keys.ProjectedCSTypeGeoKey as number | undefined;
  const gcs = keys.GeographicTypeGeoKey as number | undefined;
  const citation = (keys.PCSCitationGeoKey ?? keys.GTCitationGeoKey) as string | undefined;
  if (model === 3) throw new InputFileError(file, "geocentric model type is not a raster DEM CRS (GTModelTypeGeoKey = 3)");
  if (pcs !== undefined && pcs !== USER_DEFINED) return crsFromEpsg(pcs, file, "ProjectedCSTypeGeoKey");
  if (model === 2 || (model === undefined && pcs === undefined)) {
    if (gcs !== undefined && gcs !== USER_DEFINED) return crsFromEpsg(gcs, file, "GeographicTypeGeoKey");
    if (gcs === undefined && model === undefined) throw new InputFileError(file, "no CRS in the GeoKeys (neither a projected nor a geographic CRS)");
    const proj4 = `+proj=longlat ${geodeticProj4(keys, file)} +no_defs`.replace(/\s+/g, " ");
    return { proj4, epsg: null, name: (keys.GeogCitationGeoKey as string) || "user-defined geographic CRS", geographic: true, linearUnitM: NaN };
  }
  const u = userDefinedProj4(keys, file);
  const proj4 = u.proj4.replace(/\s+/g, " ").trim();
  const name = citation && citation !== "unknown" ? citation : `user-defined ${u.method}`;
  return { proj4, epsg: null, name, geographic: false, linearUnitM: u.unit.metres };
}

/** Vertical reference of a DEM: unit and datum of the heights. */
export interface VerticalInfo {
  /** Unit as declared or overridden ("metre", "US survey foot", ...). */
  unit: string;
  /** Metres per stored height unit (after GDAL scale/offset). */
  unitM: number;
  datum: VerticalDatum;
  /** Name of the vertical CRS or datum when declared (e.g. "NAVD88 height (ftUS)"). */
  name: string | null;
  epsg: number | null;
  warnings: string[];
}

/** User overrides for the vertical reference (e.g. from the command line). */
export interface VerticalOverrides {
  /** A unit name ("metre", "foot", "US survey foot", "ftUS") or metres per unit. */
  verticalUnit?: string | number;
  verticalDatum?: VerticalDatum;
}

const DATUM_BY_VERTICAL_CRS: Record<number, VerticalDatum> = {
  5773: "egm96", // EGM96 height
  3855: "egm2008", // EGM2008 height
  4979: "ellipsoid", // WGS 84 geographic 3D: ellipsoidal heights
};
const DATUM_BY_VERTICAL_DATUM: Record<number, VerticalDatum> = {
  5171: "egm96", // EGM96 geoid
  1027: "egm2008", // EGM2008 geoid
};

const VERTICAL_DATUMS: VerticalDatum[] = ["egm96", "egm2008", "ellipsoid", "other", "unknown"];

/**
 * Vertical unit and datum from VerticalCSTypeGeoKey / VerticalDatumGeoKey / VerticalUnitsGeoKey,
 * GDAL's band unit type, and user overrides (which win).
 * @example verticalInfo({ VerticalCSTypeGeoKey: 6360 }, "a.tif").unitM // 0.3048006096012192
 */
export function verticalInfo(keys: GeoKeys, file: string, overrides: VerticalOverrides = {}, bandUnitType?: string): VerticalInfo {
  const warnings: string[] = [];
  const vcs = keys.VerticalCSTypeGeoKey as number | undefined;
  const vdatum = keys.VerticalDatumGeoKey as number | undefined;
  const vunits = keys.VerticalUnitsGeoKey as number | undefined;
  let unit: { name: string; metres: number } | null = null;
  let datum: VerticalDatum = "unknown";
  let name: string | null = (keys.VerticalCitationGeoKey as string | undefined) ?? null;
  let epsg: number | null = null;

  if (vcs !== undefined && vcs !== USER_DEFINED) {
    const e = epsgEntry(vcs);
    if (e && /VERTCRS|GEOG3D|GEOGCRS/.test(e.kind)) {
      epsg = vcs;
      name = e.name;
      datum = DATUM_BY_VERTICAL_CRS[vcs] ?? (/GEOG/.test(e.kind) ? "ellipsoid" : "other");
      if (e.unit) unit = lengthUnitByName(e.unit);
    } else {
      warnings.push(`unknown vertical CRS code ${vcs} in VerticalCSTypeGeoKey`);
    }
  }
  if (datum === "unknown" && vdatum !== undefined && vdatum !== USER_DEFINED) datum = DATUM_BY_VERTICAL_DATUM[vdatum] ?? "other";
  if (vunits !== undefined && vunits !== USER_DEFINED) {
    const u = lengthUnit(vunits);
    if (!u) throw new InputFileError(file, `unsupported vertical unit code ${vunits} in VerticalUnitsGeoKey`);
    unit = u;
  }
  if (!unit && bandUnitType) {
    const u = lengthUnitByName(bandUnitType);
    if (u) unit = u;
    else warnings.push(`band unit "${bandUnitType}" not understood; heights taken as metres`);
  }

  if (overrides.verticalUnit !== undefined) {
    const o = overrides.verticalUnit;
    const u = typeof o === "number" ? (o > 0 && Number.isFinite(o) ? { name: `${o} m`, metres: o } : null) : lengthUnitByName(o);
    if (!u) throw new InputError("verticalUnit", o, "metre, foot, US survey foot (ftUS), or metres per unit as a number > 0");
    unit = u;
  }
  if (overrides.verticalDatum !== undefined) {
    if (!VERTICAL_DATUMS.includes(overrides.verticalDatum)) throw new InputError("verticalDatum", overrides.verticalDatum, VERTICAL_DATUMS.join(", "));
    datum = overrides.verticalDatum;
  } else if (datum === "unknown") {
    warnings.push("vertical datum not declared in the file: heights are of unknown reference (give the vertical datum, e.g. egm96, to convert them to ellipsoidal heights)");
  }
  if (!unit) {
    unit = lengthUnit(9001)!;
    if (overrides.verticalUnit === undefined && vcs === undefined) warnings.push("vertical unit not declared in the file: heights taken as metres");
  }
  return { unit: unit.name, unitM: unit.metres, datum, name, epsg, warnings };
}
