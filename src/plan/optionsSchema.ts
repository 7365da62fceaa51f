/**
 * The one table of plan-file keys: each row gives the key, its command-line
 * flag, what it means, its constraint and its default. The zod schema, the
 * CLI flags, `gsdplan plan --help` and the README are all built from it, so
 * they cannot drift apart.
 *
 * Flag scheme: a flag is the key's last name in kebab case (`focalLengthMm`
 * -> `--focal-length-mm`), prefixed where the bare name would be unclear
 * (`ceiling.heightM` -> `--ceiling-m`, `overlap.frontPct` -> `--front-overlap-pct`,
 * `aircraft.type` -> `--aircraft-type`, `target.rule` -> `--feature-rule`,
 * `clearance.minM` -> `--clearance-m`).
 */
import { z } from "zod";

export type OptionKind = "number" | "integer" | "string" | "path" | "paths" | "sources" | "enum" | "boolean" | "lonlat" | "heading";

export interface PlanOptionSpec {
  /** Dotted plan-file key, e.g. `camera.focalLengthMm`. */
  key: string;
  /** Command-line flag, e.g. `--focal-length-mm`. */
  flag: string;
  /** The property name commander gives the flag's value (camel case of the flag). */
  attribute: string;
  kind: OptionKind;
  description: string;
  /** The default applied when neither file nor flag gives a value; undefined: none. */
  default?: unknown;
  /** Why the default is what it is (shown in the README table). */
  defaultNote?: string;
  /** Human words for what is accepted, used in every error about this key. */
  allowed: string;
  choices?: readonly string[];
  gt?: number;
  gte?: number;
  lt?: number;
  lte?: number;
}

/**
 * Every default of a plan in one place. Values marked "common practice" are
 * usual in the trade with no single source; "from memory" ones are typical
 * figures recalled, not looked up: set your own.
 */
export const PLAN_DEFAULTS = {
  demVerticalUnit: undefined,
  band: 1,
  camera: {
    // 1/1000 s: a usual daylight exposure for mapping (common practice).
    exposureS: 0.001,
    // 2 s between photos: a conservative interval many mapping cameras manage (common practice).
    minIntervalS: 2,
    portrait: false,
  },
  target: {
    // ±10 % around the target GSD (common practice for a mapping specification).
    tolerancePct: 10,
    // A pixel of about a tenth of the smallest feature (common practice).
    rule: "tenth" as const,
  },
  // 80 % front and 70 % side overlap: common practice for mapping over varied ground.
  overlap: { frontPct: 80, sidePct: 70 },
  // 120 m above the ground straight below: the EU open-category figure, Regulation (EU) 2019/947
  // UAS.OPEN.010 (which measures from the closest point of the surface; choose `surface` for that).
  ceiling: { heightM: 120, reference: "ground" as const },
  clearance: {
    // 30 m above the highest ground within the safety radius: above most trees and rural
    // buildings, which a bare-earth DEM does not show (common practice, from memory).
    minM: 30,
    // 15 m horizontal safety radius: GNSS and wind drift of a small aircraft with room to spare
    // (common practice, from memory).
    safetyRadiusM: 15,
    obstacleMarginM: 0,
  },
  aircraft: {
    type: "multirotor" as const,
    // Typical small-multirotor mapping figures (from memory): set your aircraft's own.
    speedMps: 10,
    minSpeedMps: 1,
    maxClimbMps: 3,
    maxDescentMps: 2,
    enduranceMin: 20,
    // 500 m: a common visual-line-of-sight distance for a small aircraft in practice (from memory;
    // the rules require sight, not a distance: US 14 CFR 107.31, EU Regulation 2019/947 open category).
    maxRangeM: 500,
  },
  headingDeg: "auto" as const,
  // Two images is the bare minimum for stereo; five or more is usual for a solid
  // reconstruction (common practice): raise it for dense models.
  minImages: 2,
  onConflict: "skip" as const,
  crossStrips: false,
  // No distance kept beyond a keep-out zone's own outline unless asked: the zone is drawn as the
  // user means it; a buffer for GNSS and wind drift is theirs to set.
  keepOutBufferM: 0,
  // Keep a fifth of the battery in reserve (common practice).
  reservePct: 20,
  // Half a pixel of motion blur (the usual allowance is 0.5-1 px, common practice).
  blurPx: 0.5,
} as const;

const D = PLAN_DEFAULTS;

function spec(
  key: string,
  flag: string,
  kind: OptionKind,
  description: string,
  extra: Partial<PlanOptionSpec> = {},
): PlanOptionSpec {
  const s: PlanOptionSpec = { key, flag, attribute: camelOfFlag(flag), kind, description, allowed: "", ...extra };
  if (!extra.allowed) s.allowed = allowedText(s);
  return s;
}

/** `--focal-length-mm` -> `focalLengthMm`, as commander names option values. */
function camelOfFlag(flag: string): string {
  return flag.replace(/^--/, "").replace(/-([a-z0-9])/g, (_, c: string) => c.toUpperCase());
}

function allowedText(s: PlanOptionSpec): string {
  switch (s.kind) {
    case "enum":
      return `one of ${(s.choices ?? []).join(", ")}`;
    case "boolean":
      return "true or false";
    case "string":
      return "a non-empty text";
    case "path":
      return "a file path (relative paths start at the plan file's folder)";
    case "paths":
      return "a file path or a list of file paths (relative paths start at the plan file's folder; the flag may be repeated)";
    case "sources":
      return "a file, folder or http(s) URL, or a list of them (relative paths start at the plan file's folder; the flag may be repeated or comma-separated)";
    case "lonlat":
      return "[longitude, latitude] in degrees (or a list of them), longitude -180..180, latitude -90..90";
    case "heading":
      return "auto, or degrees clockwise from north, 0 <= value < 360";
    default: {
      const parts: string[] = [];
      if (s.gt !== undefined) parts.push(`> ${s.gt}`);
      if (s.gte !== undefined) parts.push(`>= ${s.gte}`);
      if (s.lt !== undefined) parts.push(`< ${s.lt}`);
      if (s.lte !== undefined) parts.push(`<= ${s.lte}`);
      const noun = s.kind === "integer" ? "a whole number" : "a number";
      return parts.length ? `${noun} ${parts.join(" and ")}` : noun;
    }
  }
}

/** The plan-file keys, their flags, constraints and defaults. */
export const PLAN_OPTION_SPECS: readonly PlanOptionSpec[] = [
  spec("name", "--name", "string", "Plan name for the summary and exported files (default: the site's name)."),
  spec("dem", "--dem", "sources", "Elevation model (required): a GeoTIFF, a list of GeoTIFF tiles, a folder of them, a GDAL VRT mosaic, or an http(s) URL of a cloud-optimized GeoTIFF."),
  spec("dtm", "--dtm", "sources", "Terrain model (bare earth) beside a surface model given as dem with demSurface dsm: the ground ceiling, heights above terrain and the take-off ground use it; same forms as dem."),
  spec("demVerticalDatum", "--dem-vertical-datum", "enum", "Vertical datum of the DEM heights; overrides what the file declares.", {
    choices: ["egm96", "egm2008", "ellipsoid"],
  }),
  spec("demVerticalUnit", "--dem-vertical-unit", "enum", "Unit of the DEM heights; overrides what the file declares.", {
    choices: ["metre", "foot", "us-survey-foot"],
  }),
  spec("demSurface", "--dem-surface", "enum", "What the DEM models: dtm (bare earth: trees and buildings missing, add an obstacle margin) or dsm (surface with them).", {
    choices: ["dtm", "dsm"],
  }),
  spec("demAccuracyM", "--dem-accuracy-m", "number", "Stated vertical accuracy of the DEM, metres (e.g. 16 m LE90 for SRTM, decimetres for lidar); shown in the report.", { gte: 0 }),
  spec("band", "--band", "integer", "DEM band holding the heights, from 1.", { gte: 1, default: D.band }),
  spec("area", "--area", "path", "Site (required): a GeoJSON or KML polygon in WGS84, or a line (LineString) with lineWidthM."),

  spec("camera.sensorWidthMm", "--sensor-width-mm", "number", "Sensor width (the image's long side), millimetres.", { gt: 0 }),
  spec("camera.sensorHeightMm", "--sensor-height-mm", "number", "Sensor height, millimetres.", { gt: 0 }),
  spec("camera.focalLengthMm", "--focal-length-mm", "number", "Focal length, millimetres (the real one, not the 35 mm equivalent).", { gt: 0 }),
  spec("camera.hfovDeg", "--hfov-deg", "number", "Horizontal field of view across the image width, degrees (instead of sensor and focal length).", {
    gt: 0,
    lt: 180,
  }),
  spec("camera.dfovDeg", "--dfov-deg", "number", "Diagonal field of view, degrees, as often sold (instead of sensor and focal length).", {
    gt: 0,
    lt: 180,
  }),
  spec("camera.imageWidthPx", "--image-width-px", "integer", "Image width in pixels (required).", { gte: 1 }),
  spec("camera.imageHeightPx", "--image-height-px", "integer", "Image height in pixels (required).", { gte: 1 }),
  spec("camera.exposureS", "--exposure-s", "number", "Exposure time, seconds (for the motion-blur speed limit).", {
    gt: 0,
    lt: 1,
    default: D.camera.exposureS,
    defaultNote: "1/1000 s, common practice for daylight mapping",
  }),
  spec("camera.minIntervalS", "--min-interval-s", "number", "Shortest interval between two photos, seconds.", {
    gt: 0,
    default: D.camera.minIntervalS,
    defaultNote: "conservative, common practice",
  }),
  spec("camera.portrait", "--portrait", "boolean", "true: image long side along the track (default: across it).", {
    default: D.camera.portrait,
  }),

  spec("target.gsdCm", "--gsd-cm", "number", "Target ground sample distance, cm per pixel (or give smallestFeatureCm).", { gt: 0 }),
  spec("target.smallestFeatureCm", "--smallest-feature-cm", "number", "Smallest feature to see, cm; the GSD follows from the rule.", { gt: 0 }),
  spec("target.rule", "--feature-rule", "enum", "How many pixels across the smallest feature: tenth (pixel = feature/10) or Johnson's detection, recognition, identification.", {
    choices: ["tenth", "detection", "recognition", "identification"],
    default: D.target.rule,
    defaultNote: "a tenth of the feature, common practice",
  }),
  spec("target.tolerancePct", "--tolerance-pct", "number", "Allowed GSD deviation from the target, percent each way.", {
    gt: 0,
    lt: 100,
    default: D.target.tolerancePct,
    defaultNote: "common practice",
  }),

  spec("overlap.frontPct", "--front-overlap-pct", "number", "Overlap between successive photos along a strip, percent.", {
    gte: 0,
    lt: 100,
    default: D.overlap.frontPct,
    defaultNote: "common practice",
  }),
  spec("overlap.sidePct", "--side-overlap-pct", "number", "Overlap between neighbouring strips, percent.", {
    gte: 0,
    lt: 100,
    default: D.overlap.sidePct,
    defaultNote: "common practice",
  }),

  spec("ceiling.heightM", "--ceiling-m", "number", "Height ceiling, metres, measured from the reference.", {
    gt: 0,
    default: D.ceiling.heightM,
    defaultNote: "EU open category, Regulation (EU) 2019/947; check your local rules",
  }),
  spec("ceiling.reference", "--ceiling-reference", "enum", "What the ceiling is measured from: the ground straight below, the closest terrain surface, or the take-off point.", {
    choices: ["ground", "surface", "takeoff"],
    default: D.ceiling.reference,
  }),

  spec("clearance.minM", "--clearance-m", "number", "Least height above the highest ground within the safety radius, metres.", {
    gt: 0,
    default: D.clearance.minM,
    defaultNote: "above most trees and rural buildings a bare-earth DEM does not show (common practice, from memory)",
  }),
  spec("clearance.safetyRadiusM", "--safety-radius-m", "number", "Horizontal radius around the track searched for the highest ground, metres.", {
    gte: 0,
    default: D.clearance.safetyRadiusM,
    defaultNote: "common practice, from memory",
  }),
  spec("clearance.obstacleMarginM", "--obstacle-margin-m", "number", "Extra height for obstacles the DEM does not hold (trees, masts), metres.", {
    gte: 0,
    default: D.clearance.obstacleMarginM,
  }),

  spec("aircraft.type", "--aircraft-type", "enum", "Aircraft type.", { choices: ["multirotor", "fixed-wing"], default: D.aircraft.type }),
  spec("aircraft.speedMps", "--speed-mps", "number", "Ground speed on photo strips, m/s (capped by the camera's interval and blur).", {
    gt: 0,
    default: D.aircraft.speedMps,
    defaultNote: "typical small multirotor, from memory",
  }),
  spec("aircraft.transitSpeedMps", "--transit-speed-mps", "number", "Ground speed between strips and to/from take-off, m/s (default: speedMps).", {
    gt: 0,
  }),
  spec("aircraft.minSpeedMps", "--min-speed-mps", "number", "Slowest safe ground speed, m/s (required for fixed-wing: above stall).", {
    gt: 0,
    default: D.aircraft.minSpeedMps,
    defaultNote: "multirotor only; typical, from memory",
  }),
  spec("aircraft.maxClimbMps", "--max-climb-mps", "number", "Greatest climb rate, m/s.", {
    gt: 0,
    default: D.aircraft.maxClimbMps,
    defaultNote: "typical small multirotor, from memory",
  }),
  spec("aircraft.maxDescentMps", "--max-descent-mps", "number", "Greatest descent rate, m/s.", {
    gt: 0,
    default: D.aircraft.maxDescentMps,
    defaultNote: "typical small multirotor, from memory",
  }),
  spec("aircraft.enduranceMin", "--endurance-min", "number", "Flight time of one battery, minutes (before the reserve).", {
    gt: 0,
    default: D.aircraft.enduranceMin,
    defaultNote: "typical small multirotor, from memory",
  }),
  spec("aircraft.maxRangeM", "--max-range-m", "number", "Greatest horizontal distance from the flight's take-off point, metres; 0: no limit. Larger sites are split into blocks, each flown from its own take-off point.", {
    gte: 0,
    default: D.aircraft.maxRangeM,
    defaultNote: "a common visual line of sight in practice, from memory",
  }),
  spec("aircraft.maxWaypoints", "--max-waypoints", "integer", "Most waypoints the autopilot takes in one flight (default: no limit).", {
    gte: 2,
  }),

  spec("takeoff", "--takeoff", "lonlat", "Take-off point [longitude, latitude], or a list of candidate points when the site needs several (each block uses the nearest that reaches it); default: a site corner, or one proposed per block. Flag form: --takeoff LON,LAT (repeatable)."),
  spec("headingDeg", "--heading-deg", "heading", "Strip direction, degrees clockwise from north, or auto.", { default: D.headingDeg }),
  spec("minImages", "--min-images", "integer", "Fewest images that must see each ground cell.", {
    gte: 1,
    default: D.minImages,
    defaultNote: "the stereo minimum; 5+ is usual for solid models (common practice)",
  }),
  spec("onConflict", "--on-conflict", "enum", "Where clearance and ceiling conflict: skip that part of the strip, or keep clearance and break the ceiling (flagged).", {
    choices: ["skip", "clearance"],
    default: D.onConflict,
  }),
  spec("lineWidthM", "--line-width-m", "number", "Width imaged along a line site (area given as a LineString), centred on the line, metres; required with a line.", { gt: 0 }),
  spec("lineStrips", "--line-strips", "integer", "Strips along a line site (default: the fewest that cover lineWidthM with the side overlap).", { gte: 1 }),
  spec("crossStrips", "--cross-strips", "boolean", "Fly a second family of strips at the heading plus 90 degrees over the same site (for 3D models of facades and steep faces).", {
    default: D.crossStrips,
  }),
  spec("keepOut", "--keep-out", "paths", "Keep-out zones no leg may enter: GeoJSON or KML polygons in WGS84, holes allowed; each feature's name names its zone."),
  spec("keepOutBufferM", "--keep-out-buffer-m", "number", "Horizontal distance every leg keeps from every keep-out zone, metres (a feature's own bufferM property overrides it).", {
    gte: 0,
    default: D.keepOutBufferM,
  }),
  spec("assumeGroundM", "--assume-ground-m", "number", "Ground height (metres AMSL) to assume where the DEM has no data; without it such ground is unflyable."),
  spec("reservePct", "--reserve-pct", "number", "Share of the endurance kept in reserve, percent.", {
    gte: 0,
    lt: 100,
    default: D.reservePct,
    defaultNote: "common practice",
  }),
  spec("blurPx", "--blur-px", "number", "Allowed motion blur, pixels.", {
    gt: 0,
    default: D.blurPx,
    defaultNote: "usual allowance 0.5-1 px, common practice",
  }),
];

/** Lookup by dotted key. */
export const SPEC_BY_KEY: ReadonlyMap<string, PlanOptionSpec> = new Map(PLAN_OPTION_SPECS.map((s) => [s.key, s]));

/** Lookup by flag (`--gsd-cm`). */
export const SPEC_BY_FLAG: ReadonlyMap<string, PlanOptionSpec> = new Map(PLAN_OPTION_SPECS.map((s) => [s.flag, s]));

/** Descriptions of the object-valued keys, for errors and help. */
export const GROUP_DESCRIPTIONS: Readonly<Record<string, string>> = {
  camera: "the camera: sensor and focal length, or a field of view, with the image size",
  target: "the detail wanted: gsdCm, or smallestFeatureCm with a rule",
  overlap: "photo overlaps",
  ceiling: "the height ceiling and what it is measured from",
  clearance: "terrain clearance",
  aircraft: "the aircraft's speeds, climb limits and endurance",
};

/** The known child names of an object path ("" for the top level). */
export function knownKeysAt(parent: string): string[] {
  const names = new Set<string>();
  const prefix = parent ? parent + "." : "";
  for (const s of PLAN_OPTION_SPECS) {
    if (!s.key.startsWith(prefix)) continue;
    names.add(s.key.slice(prefix.length).split(".")[0]);
  }
  return [...names];
}

function leafSchema(s: PlanOptionSpec): z.ZodType {
  switch (s.kind) {
    case "number":
    case "integer": {
      let n = s.kind === "integer" ? z.number().int() : z.number();
      if (s.gt !== undefined) n = n.gt(s.gt);
      if (s.gte !== undefined) n = n.gte(s.gte);
      if (s.lt !== undefined) n = n.lt(s.lt);
      if (s.lte !== undefined) n = n.lte(s.lte);
      return n;
    }
    case "string":
    case "path":
      return z.string().min(1);
    case "paths":
    case "sources":
      return z.union([z.string().min(1), z.array(z.string().min(1)).min(1)]);
    case "enum":
      return z.enum(s.choices as [string, ...string[]]);
    case "boolean":
      return z.boolean();
    case "lonlat": {
      const point = z.tuple([z.number().gte(-180).lte(180), z.number().gte(-90).lte(90)]);
      return z.union([point, z.array(point).min(1)]);
    }
    case "heading":
      return z.union([z.literal("auto"), z.number().gte(0).lt(360)]);
  }
}

/**
 * The zod schema of a plan file, built from the table: strict objects
 * (unknown keys are errors), every key optional here; required keys and the
 * either/or rules are checked after defaults, in options.ts.
 */
export function buildPlanFileSchema(): z.ZodType {
  const top: Record<string, z.ZodType> = {};
  const groups: Record<string, Record<string, z.ZodType>> = {};
  for (const s of PLAN_OPTION_SPECS) {
    const [head, leaf] = s.key.split(".");
    if (leaf === undefined) top[head] = leafSchema(s).optional();
    else (groups[head] ??= {})[leaf] = leafSchema(s).optional();
  }
  for (const [g, shape] of Object.entries(groups)) top[g] = z.strictObject(shape).optional();
  return z.strictObject(top);
}

function defaultText(s: PlanOptionSpec): string {
  if (s.default === undefined) return "";
  return typeof s.default === "string" ? s.default : JSON.stringify(s.default);
}

/**
 * The keys as a Markdown table (key, flag, meaning, default) for the README.
 *
 * @example planOptionsMarkdown().split("\n")[0] // "| key | flag | meaning | default |"
 */
export function planOptionsMarkdown(): string {
  const esc = (t: string) => t.replace(/\|/g, "\\|");
  const lines = ["| key | flag | meaning | default |", "| --- | --- | --- | --- |"];
  for (const s of PLAN_OPTION_SPECS) {
    const d = defaultText(s);
    const note = s.defaultNote ? ` (${s.defaultNote})` : "";
    lines.push(`| \`${s.key}\` | \`${s.flag}\` | ${esc(s.description)} Allowed: ${esc(s.allowed)}. | ${d ? `\`${esc(d)}\`${esc(note)}` : ""} |`);
  }
  return lines.join("\n");
}

/**
 * One help line per key for `gsdplan plan --help`: flag, meaning, default.
 *
 * @example planOptionsHelp()[0] // "--name <text>  Plan name ..."
 */
export function planOptionsHelp(): { flags: string; description: string }[] {
  const arg: Record<OptionKind, string> = {
    number: "<n>",
    integer: "<n>",
    string: "<text>",
    path: "<file>",
    paths: "<file>",
    sources: "<file|url>",
    enum: "<choice>",
    boolean: "[bool]",
    lonlat: "<lon,lat>",
    heading: "<deg|auto>",
  };
  return PLAN_OPTION_SPECS.map((s) => {
    const d = defaultText(s);
    const choices = s.kind === "enum" ? ` (${(s.choices ?? []).join("|")})` : "";
    return { flags: `${s.flag} ${arg[s.kind]}`, description: `${s.description}${choices} [key ${s.key}${d ? `; default ${d}` : ""}]` };
  });
}
