/**
 * Plan options: read a plan file (JSON or YAML), merge command-line flags over
 * it, validate against the key table of optionsSchema.ts and return fully
 * typed, defaulted options. Every problem becomes one line
 * `<key>: <problem> (got <value>; allowed: <what>)`.
 */
import { readFile } from "node:fs/promises";
import path from "node:path";
import { closest } from "fastest-levenshtein";
import { parse as parseYaml } from "yaml";
import type { z } from "zod";
import { InputError, InputFileError } from "../errors.js";
import {
  GROUP_DESCRIPTIONS,
  PLAN_DEFAULTS,
  PLAN_OPTION_SPECS,
  SPEC_BY_KEY,
  buildPlanFileSchema,
  knownKeysAt,
  type PlanOptionSpec,
} from "./optionsSchema.js";

export { PLAN_DEFAULTS, PLAN_OPTION_SPECS } from "./optionsSchema.js";
export type { PlanOptionSpec } from "./optionsSchema.js";

/** The camera as the user described it; `model` says which description. */
export type CameraOptions = {
  imageWidthPx: number;
  imageHeightPx: number;
  exposureS: number;
  minIntervalS: number;
  portrait: boolean;
} & (
  | { model: "sensor"; sensorWidthMm: number; sensorHeightMm?: number; focalLengthMm: number }
  | { model: "hfov"; hfovDeg: number }
  | { model: "dfov"; dfovDeg: number }
);

export type FeatureRule = "tenth" | "detection" | "recognition" | "identification";

export type TargetOptions = { tolerancePct: number } & (
  | { by: "gsd"; gsdCm: number }
  | { by: "feature"; smallestFeatureCm: number; rule: FeatureRule }
);

export interface PlanOptions {
  name?: string;
  /**
   * The elevation model: one source, or a list (tiles; later ones win where they overlap).
   * Each is an absolute path (GeoTIFF, folder of GeoTIFFs, GDAL VRT) or an http(s) URL.
   */
  dem: string | string[];
  /** Terrain model beside a surface model in `dem` (same forms as `dem`). */
  dtm?: string | string[];
  demVerticalDatum?: "egm96" | "egm2008" | "ellipsoid";
  demVerticalUnit?: "metre" | "foot" | "us-survey-foot";
  demSurface?: "dtm" | "dsm";
  demAccuracyM?: number;
  band: number;
  /** Absolute path. */
  area: string;
  camera: CameraOptions;
  target: TargetOptions;
  overlap: { frontPct: number; sidePct: number };
  ceiling: { heightM: number; reference: "ground" | "surface" | "takeoff" };
  clearance: { minM: number; safetyRadiusM: number; obstacleMarginM: number };
  aircraft: {
    type: "multirotor" | "fixed-wing";
    speedMps: number;
    transitSpeedMps: number;
    minSpeedMps: number;
    maxClimbMps: number;
    maxDescentMps: number;
    enduranceMin: number;
    /** null: no limit. */
    maxWaypoints: number | null;
    /** Greatest horizontal distance from the flight's take-off point, metres; 0: no limit. */
    maxRangeM: number;
  };
  /** [lon, lat]; undefined: chosen by the layout (or proposed per block), or `takeoffs` given. */
  takeoff?: [number, number];
  /** Candidate take-off points [lon, lat] when more than one is given: each block uses the nearest that reaches it. */
  takeoffs?: [number, number][];
  headingDeg: "auto" | number;
  minImages: number;
  onConflict: "skip" | "clearance";
  assumeGroundM?: number;
  /** Width imaged along a line site, metres (required when the area is a line). */
  lineWidthM?: number;
  /** Strips along a line site; undefined: the fewest that cover the width. */
  lineStrips?: number;
  /** A second family of strips at the heading plus 90 degrees. */
  crossStrips: boolean;
  /** Keep-out zone files (absolute paths; empty: none). */
  keepOut: string[];
  /** Distance kept from every keep-out zone unless the zone gives its own, metres. */
  keepOutBufferM: number;
  reservePct: number;
  blurPx: number;
}

/**
 * Several problems in one plan: `message` has one line per problem, `problems`
 * holds each as its own InputError. Still an InputError, so the CLI exits 2.
 */
export class PlanOptionsError extends InputError {
  readonly problems: InputError[];
  constructor(problems: InputError[]) {
    super(problems[0].field, problems[0].value, problems[0].allowed);
    this.message = problems.map((p) => p.message).join("\n");
    this.name = "PlanOptionsError";
    this.problems = problems;
  }
}

export interface LoadedPlanFile {
  /** The parsed content (not yet validated). */
  data: unknown;
  /** Absolute path of the file. */
  file: string;
  /** Its folder: relative paths inside resolve against it. */
  dir: string;
}

/**
 * Reads a plan file: JSON for `.json`, YAML for `.yaml`/`.yml`, otherwise
 * JSON when the text starts with `{`, else YAML.
 *
 * @example
 *   const { data, dir } = await loadPlanFile("site/plan.yaml");
 *   const options = resolvePlanOptions(data, { "target.gsdCm": 2 }, dir);
 */
export async function loadPlanFile(file: string): Promise<LoadedPlanFile> {
  const abs = path.resolve(file);
  let text: string;
  try {
    text = await readFile(abs, "utf8");
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new InputFileError(file, code === "ENOENT" ? "plan file not found" : `cannot read the plan file (${code ?? String(e)})`);
  }
  const ext = path.extname(abs).toLowerCase();
  const asJson = ext === ".json" || (ext !== ".yaml" && ext !== ".yml" && text.trimStart().startsWith("{"));
  let data: unknown;
  try {
    data = asJson ? JSON.parse(text) : parseYaml(text);
  } catch (e) {
    const msg = (e as Error).message.split("\n")[0];
    throw new InputFileError(file, `not valid ${asJson ? "JSON" : "YAML"}: ${msg}`);
  }
  return { data, file: abs, dir: path.dirname(abs) };
}

/**
 * Parses one command-line flag value (always a string, or `true` for a bare
 * boolean flag) into the key's type. Range checks happen later, in
 * resolvePlanOptions, so every key is checked the same way.
 *
 * @example parseFlagValue(SPEC_BY_KEY.get("target.gsdCm")!, "2.5") // 2.5
 */
export function parseFlagValue(s: PlanOptionSpec, raw: unknown): unknown {
  // A repeated flag (commander collects them): each value parsed alone.
  // A repeated --takeoff: one point, or a list of candidates.
  if (Array.isArray(raw) && s.kind === "lonlat") return raw.length === 1 ? parseFlagValue(s, raw[0]) : raw.map((r) => parseFlagValue(s, r));
  if (Array.isArray(raw) && (s.kind === "paths" || s.kind === "sources")) {
    const all = raw.flatMap((r) => parseFlagValue(s, r) as string | string[]);
    return s.kind === "sources" && all.length === 1 ? all[0] : all;
  }
  if (typeof raw !== "string") return raw;
  const text = raw.trim();
  const num = (t: string): number => {
    const v = t === "" ? NaN : Number(t);
    if (!Number.isFinite(v)) throw new InputError(s.flag, raw, s.allowed, "not a number");
    return v;
  };
  switch (s.kind) {
    case "number":
    case "integer":
      return num(text);
    case "boolean": {
      const t = text.toLowerCase();
      if (["true", "yes", "1"].includes(t)) return true;
      if (["false", "no", "0"].includes(t)) return false;
      throw new InputError(s.flag, raw, s.allowed, "not true or false");
    }
    case "lonlat": {
      const parts = text.split(",");
      if (parts.length !== 2) throw new InputError(s.flag, raw, "LON,LAT in degrees, e.g. 12.5,47.1", "not a longitude,latitude pair");
      return [num(parts[0].trim()), num(parts[1].trim())];
    }
    case "heading":
      return text.toLowerCase() === "auto" ? "auto" : num(text);
    case "paths":
      return [raw];
    case "sources": {
      // A comma-separated flag is a list; a URL's own commas are rare enough to ask for repetition instead.
      const parts = text.split(",").map((t) => t.trim()).filter(Boolean);
      return parts.length === 1 ? parts[0] : parts;
    }
    default:
      return raw;
  }
}

/**
 * Picks the plan flags out of commander's parsed options (keyed by the
 * specs' `attribute`) and parses their strings: the result feeds
 * resolvePlanOptions' `flagOverrides`.
 *
 * @example flagOverridesFromParsed({ gsdCm: "2", ceilingReference: "takeoff" })
 *   // { "target.gsdCm": 2, "ceiling.reference": "takeoff" }
 */
export function flagOverridesFromParsed(parsed: Record<string, unknown>): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const s of PLAN_OPTION_SPECS) {
    const v = parsed[s.attribute];
    if (v !== undefined) out[s.key] = parseFlagValue(s, v);
  }
  return out;
}

const fileSchema = buildPlanFileSchema();

/**
 * Validates a plan file's content with flag overrides applied over it and
 * returns complete options. `flagOverrides` is keyed by dotted key
 * (`"camera.focalLengthMm"`) with values already typed (see
 * flagOverridesFromParsed). Relative `dem`/`area` paths from the file resolve
 * against `planFileDir`; those from flags against `flagDir` (the shell's cwd).
 *
 * @example
 *   resolvePlanOptions({ dem: "dem.tif", area: "site.geojson",
 *     camera: { sensorWidthMm: 13.2, focalLengthMm: 8.8, imageWidthPx: 5472, imageHeightPx: 3648 },
 *     target: { gsdCm: 2 } }, {}, "/data/site").dem // "/data/site/dem.tif"
 */
export function resolvePlanOptions(
  fileObject: unknown,
  flagOverrides: Record<string, unknown> = {},
  planFileDir: string = process.cwd(),
  flagDir: string = process.cwd(),
): PlanOptions {
  const fromFlag = new Set<string>();
  const problems: InputError[] = [];
  const base = fileObject ?? {};
  if (typeof base !== "object" || Array.isArray(base)) {
    throw new InputError("plan file", fileObject, "a mapping of keys such as dem, area, camera, target", "not a set of keys");
  }
  const merged: Record<string, unknown> = structuredClone(base as Record<string, unknown>);
  for (const [key, value] of Object.entries(flagOverrides)) {
    const s = SPEC_BY_KEY.get(key);
    if (!s) {
      problems.push(unknownKey(key, key.includes(".") ? key.slice(0, key.lastIndexOf(".")) : ""));
      continue;
    }
    if (value === undefined) continue;
    fromFlag.add(key);
    setPath(merged, key, value);
  }
  if (problems.length) throw combined(problems);

  const parsed = fileSchema.safeParse(merged, { reportInput: true });
  if (!parsed.success) {
    for (const issue of parsed.error.issues) problems.push(...issueToErrors(issue, fromFlag));
    throw combined(problems);
  }
  const v = parsed.data as Record<string, any>;
  const label = (key: string) => (fromFlag.has(key) ? `${SPEC_BY_KEY.get(key)!.flag} (${key})` : key);
  const def = <T>(key: string): T => SPEC_BY_KEY.get(key)!.default as T;
  const need = (key: string, value: unknown) => {
    if (value === undefined) problems.push(new InputError(key, undefined, SPEC_BY_KEY.get(key)!.allowed, `required (${SPEC_BY_KEY.get(key)!.flag})`));
  };
  const resolvePath = (key: string, p: string | undefined) =>
    p === undefined ? "" : path.resolve(fromFlag.has(key) ? flagDir : planFileDir, p);
  // A URL stays as it is; anything else is a path.
  const resolveSource = (key: string, p: string | undefined) => (p !== undefined && /^https?:\/\//i.test(p) ? p : resolvePath(key, p));

  need("dem", v.dem);
  need("area", v.area);
  const cam = v.camera ?? {};
  need("camera.imageWidthPx", cam.imageWidthPx);
  need("camera.imageHeightPx", cam.imageHeightPx);
  const tgt = v.target ?? {};
  const air = v.aircraft ?? {};

  // Camera: exactly one description of the optics.
  const forms = [
    cam.sensorWidthMm !== undefined || cam.focalLengthMm !== undefined || cam.sensorHeightMm !== undefined ? "sensor" : null,
    cam.hfovDeg !== undefined ? "hfov" : null,
    cam.dfovDeg !== undefined ? "dfov" : null,
  ].filter((f): f is string => f !== null);
  const cameraAllowed = "sensorWidthMm + focalLengthMm (+ sensorHeightMm), or hfovDeg, or dfovDeg, with imageWidthPx and imageHeightPx";
  let optics: any = null;
  if (forms.length === 0) {
    problems.push(new InputError("camera", v.camera, cameraAllowed, "no optics given"));
  } else if (forms.length > 1) {
    problems.push(new InputError("camera", v.camera, cameraAllowed, `give one description of the optics, not ${forms.join(" and ")}`));
  } else if (forms[0] === "sensor") {
    need("camera.sensorWidthMm", cam.sensorWidthMm);
    need("camera.focalLengthMm", cam.focalLengthMm);
    optics = { model: "sensor", sensorWidthMm: cam.sensorWidthMm, focalLengthMm: cam.focalLengthMm };
    if (cam.sensorHeightMm !== undefined) optics.sensorHeightMm = cam.sensorHeightMm;
  } else if (forms[0] === "hfov") optics = { model: "hfov", hfovDeg: cam.hfovDeg };
  else optics = { model: "dfov", dfovDeg: cam.dfovDeg };

  // Target: a GSD, or a feature size and rule.
  let target: any = null;
  const tolerancePct = tgt.tolerancePct ?? def<number>("target.tolerancePct");
  if ((tgt.gsdCm === undefined) === (tgt.smallestFeatureCm === undefined)) {
    problems.push(
      new InputError(
        "target",
        v.target,
        "gsdCm, or smallestFeatureCm with rule",
        tgt.gsdCm === undefined ? "no target detail given" : "give gsdCm or smallestFeatureCm, not both",
      ),
    );
  } else if (tgt.gsdCm !== undefined) {
    if (tgt.rule !== undefined) problems.push(new InputError(label("target.rule"), tgt.rule, "rule only with smallestFeatureCm", "a rule needs smallestFeatureCm"));
    target = { by: "gsd", gsdCm: tgt.gsdCm, tolerancePct };
  } else {
    target = { by: "feature", smallestFeatureCm: tgt.smallestFeatureCm, rule: tgt.rule ?? def("target.rule"), tolerancePct };
  }

  // Aircraft: a fixed-wing's slowest speed is its stall margin, too important to default.
  const type = air.type ?? def("aircraft.type");
  if (type === "fixed-wing") need("aircraft.minSpeedMps", air.minSpeedMps);
  const speedMps: number = air.speedMps ?? def("aircraft.speedMps");
  const minSpeedMps: number = air.minSpeedMps ?? def("aircraft.minSpeedMps");
  if (air.minSpeedMps !== undefined || air.speedMps !== undefined) {
    if (minSpeedMps > speedMps) {
      const k = air.minSpeedMps !== undefined ? "aircraft.minSpeedMps" : "aircraft.speedMps";
      problems.push(
        new InputError(label(k), k === "aircraft.minSpeedMps" ? minSpeedMps : speedMps, `minSpeedMps <= speedMps (speedMps ${speedMps}, minSpeedMps ${minSpeedMps})`, "slowest speed above the strip speed"),
      );
    }
  }
  if (v.dtm !== undefined && v.demSurface !== "dsm") {
    problems.push(new InputError(label("dtm"), v.dtm, "a terrain model beside a surface model: set demSurface: dsm for the dem", "dtm given without a surface model"));
  }
  if (problems.length) throw combined(problems);

  const ceil = v.ceiling ?? {};
  const clr = v.clearance ?? {};
  const ovl = v.overlap ?? {};
  const out: PlanOptions = {
    dem: Array.isArray(v.dem) ? v.dem.map((p: string) => resolveSource("dem", p)) : resolveSource("dem", v.dem),
    band: v.band ?? def("band"),
    area: resolvePath("area", v.area),
    camera: {
      ...optics,
      imageWidthPx: cam.imageWidthPx,
      imageHeightPx: cam.imageHeightPx,
      exposureS: cam.exposureS ?? def("camera.exposureS"),
      minIntervalS: cam.minIntervalS ?? def("camera.minIntervalS"),
      portrait: cam.portrait ?? def("camera.portrait"),
    },
    target,
    overlap: { frontPct: ovl.frontPct ?? def("overlap.frontPct"), sidePct: ovl.sidePct ?? def("overlap.sidePct") },
    ceiling: { heightM: ceil.heightM ?? def("ceiling.heightM"), reference: ceil.reference ?? def("ceiling.reference") },
    clearance: {
      minM: clr.minM ?? def("clearance.minM"),
      safetyRadiusM: clr.safetyRadiusM ?? def("clearance.safetyRadiusM"),
      obstacleMarginM: clr.obstacleMarginM ?? def("clearance.obstacleMarginM"),
    },
    aircraft: {
      type,
      speedMps,
      transitSpeedMps: air.transitSpeedMps ?? speedMps,
      minSpeedMps,
      maxClimbMps: air.maxClimbMps ?? def("aircraft.maxClimbMps"),
      maxDescentMps: air.maxDescentMps ?? def("aircraft.maxDescentMps"),
      enduranceMin: air.enduranceMin ?? def("aircraft.enduranceMin"),
      maxWaypoints: air.maxWaypoints ?? null,
      maxRangeM: air.maxRangeM ?? def("aircraft.maxRangeM"),
    },
    headingDeg: v.headingDeg ?? def("headingDeg"),
    minImages: v.minImages ?? def("minImages"),
    onConflict: v.onConflict ?? def("onConflict"),
    keepOut: (v.keepOut === undefined ? [] : Array.isArray(v.keepOut) ? v.keepOut : [v.keepOut]).map((p: string) => resolvePath("keepOut", p)),
    keepOutBufferM: v.keepOutBufferM ?? def("keepOutBufferM"),
    crossStrips: v.crossStrips ?? def("crossStrips"),
    reservePct: v.reservePct ?? def("reservePct"),
    blurPx: v.blurPx ?? def("blurPx"),
  };
  if (v.name !== undefined) out.name = v.name;
  if (v.demVerticalDatum !== undefined) out.demVerticalDatum = v.demVerticalDatum;
  if (v.demVerticalUnit !== undefined) out.demVerticalUnit = v.demVerticalUnit;
  if (v.demSurface !== undefined) out.demSurface = v.demSurface;
  if (v.demAccuracyM !== undefined) out.demAccuracyM = v.demAccuracyM;
  if (v.takeoff !== undefined) {
    const list: [number, number][] = Array.isArray(v.takeoff[0]) ? v.takeoff.map((p: number[]) => [p[0], p[1]]) : [[v.takeoff[0], v.takeoff[1]]];
    if (list.length === 1) out.takeoff = list[0];
    else out.takeoffs = list;
  }
  if (v.assumeGroundM !== undefined) out.assumeGroundM = v.assumeGroundM;
  if (v.dtm !== undefined) out.dtm = Array.isArray(v.dtm) ? v.dtm.map((p: string) => resolveSource("dtm", p)) : resolveSource("dtm", v.dtm);
  if (v.lineWidthM !== undefined) out.lineWidthM = v.lineWidthM;
  if (v.lineStrips !== undefined) out.lineStrips = v.lineStrips;
  return out;
}

function combined(problems: InputError[]): InputError {
  return problems.length === 1 ? problems[0] : new PlanOptionsError(problems);
}

function setPath(obj: Record<string, unknown>, key: string, value: unknown): void {
  const parts = key.split(".");
  let cur: Record<string, unknown> = obj;
  for (const p of parts.slice(0, -1)) {
    const next = cur[p];
    // A flag for a nested key over a non-object file value: the schema will report the file's value.
    if (next === undefined) cur[p] = {};
    else if (typeof next !== "object" || next === null || Array.isArray(next)) return;
    cur = cur[p] as Record<string, unknown>;
  }
  cur[parts[parts.length - 1]] = value;
}

/**
 * An unknown key, with the nearest known key at the same level as a
 * suggestion: a known key that contains the name (a shortened key such as
 * `focal`) wins, otherwise the smallest case-insensitive Levenshtein distance.
 */
export function unknownKey(full: string, parent: string, value?: unknown): InputError {
  const known = knownKeysAt(parent);
  const name = parent ? full.slice(parent.length + 1) : full;
  const lower = known.map((k) => k.toLowerCase());
  const needle = name.toLowerCase();
  const containing = needle.length >= 3 ? lower.findIndex((k) => k.includes(needle)) : -1;
  const best = !known.length ? undefined : known[containing >= 0 ? containing : lower.indexOf(closest(needle, lower))];
  const scope = parent ? `keys of ${parent}` : "top-level keys";
  return new InputError(full, value, `${scope}: ${known.join(", ")}`, best !== undefined ? `unknown key (did you mean ${best}?)` : "unknown key");
}

const NUMERIC_KINDS = new Set(["number", "integer", "heading", "lonlat"]);

function issueToErrors(issue: z.core.$ZodIssue, fromFlag: Set<string>): InputError[] {
  const pathParts = issue.path.map(String);
  const key = pathParts.filter((p) => !/^\d+$/.test(p)).join(".");
  const where = pathParts.join(".").replace(/\.(\d+)/g, "[$1]");
  const s = SPEC_BY_KEY.get(key);
  const field = s && fromFlag.has(key) ? `${s.flag} (${where})` : where || "plan file";
  const input = (issue as { input?: unknown }).input;

  if (issue.code === "unrecognized_keys") {
    return issue.keys.map((k) => {
      const full = key ? `${key}.${k}` : k;
      return unknownKey(full, key, (input as Record<string, unknown> | undefined)?.[k]);
    });
  }
  if (issue.code === "invalid_union" && s && ["lonlat", "paths", "sources"].includes(s.kind)) {
    // A key that takes one value or a list (schema branches [one, list]): report the problem of
    // the form the value has, not "not accepted".
    const branches = (issue as { errors?: z.core.$ZodIssue[][] }).errors ?? [];
    const isList = Array.isArray(input) && (s.kind !== "lonlat" || Array.isArray(input[0]));
    const chosen = branches[isList ? 1 : 0];
    if (chosen?.length) return chosen.flatMap((i) => issueToErrors({ ...i, path: [...issue.path, ...i.path] } as z.core.$ZodIssue, fromFlag));
  }
  const allowed = s?.allowed ?? (GROUP_DESCRIPTIONS[key] ? `an object with ${knownKeysAt(key).join(", ")}` : "see gsdplan plan --help");
  if (typeof input === "string" && s && NUMERIC_KINDS.has(s.kind) && input.trim() !== "" && Number.isFinite(Number(input))) {
    return [new InputError(field, input, allowed, "a number written as text; remove the quotes")];
  }
  let detail: string;
  switch (issue.code) {
    case "invalid_type":
      detail = input === undefined ? "required" : `wrong type, expected ${GROUP_DESCRIPTIONS[key] ? "an object" : issue.expected === "int" ? "a whole number" : issue.expected}`;
      if (typeof input === "number" && !Number.isFinite(input)) detail = "not a finite number";
      break;
    case "invalid_value":
      detail = "not one of the choices";
      break;
    case "too_small":
    case "too_big":
      detail = issue.origin === "array" ? "wrong number of values" : "out of range";
      break;
    case "invalid_union":
      detail = "not accepted";
      break;
    default:
      detail = issue.message;
  }
  return [new InputError(field, input, allowed, detail)];
}
