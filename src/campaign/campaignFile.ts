/**
 * Reads a campaign file (JSON or YAML): `defaults` (any plan keys) and `sites` (a
 * list, each with a `name` and plan keys over the defaults). Only the file's shape is
 * checked here; each site's plan keys are checked when it is planned, so one bad site
 * does not stop the others.
 */
import { InputError, InputFileError } from "../errors.js";
import { loadPlanFile, type LoadedPlanFile } from "../plan/options.js";
import { isMapping, mergePlanKeys } from "./merge.js";
import { checkSiteName, folderKey } from "./siteName.js";
import type { CampaignFile, CampaignSite } from "./types.js";

const TOP_KEYS = ["defaults", "sites"];

/**
 * Reads and checks a campaign file (JSON or YAML, told apart as plan files are);
 * throws InputFileError / InputError (one line) when it is not JSON/YAML, has no
 * sites, or names a site twice or unsafely.
 * @example const c = await readCampaignFile("fixtures/campaign/three-sites.yaml"); c.sites.map((s) => s.name)
 */
export async function readCampaignFile(file: string): Promise<CampaignFile> {
  let loaded: LoadedPlanFile;
  try {
    loaded = await loadPlanFile(file);
  } catch (e) {
    // The plan-file reader's words, with the file called what it is here.
    if (e instanceof InputFileError) throw new InputFileError(file, e.message.slice(file.length + 2).replace(/\bplan file\b/, "campaign file"));
    throw e;
  }
  return { file: loaded.file, dir: loaded.dir, sites: campaignSites(loaded.data) };
}

/**
 * The sites of a parsed campaign file, each with the defaults merged under its keys.
 * @example campaignSites({ defaults: { minImages: 3 }, sites: [{ name: "a", area: "a.geojson" }] })[0].planObject
 *   // { minImages: 3, area: "a.geojson", name: "a" }
 */
export function campaignSites(data: unknown): CampaignSite[] {
  const shape = "a mapping with defaults (plan keys) and sites (a list of sites, each with a name and plan keys)";
  if (!isMapping(data)) throw new InputError("campaign file", data, shape, "not a mapping of keys");
  for (const k of Object.keys(data)) {
    if (!TOP_KEYS.includes(k)) throw new InputError(k, data[k], `top-level keys: ${TOP_KEYS.join(", ")}`, "unknown key in the campaign file");
  }
  const defaults = data.defaults ?? {};
  if (!isMapping(defaults)) throw new InputError("defaults", defaults, "a mapping of plan keys (camera, target, ...)", "not a mapping");
  if ("name" in defaults) throw new InputError("defaults.name", defaults.name, "a name on each site, not in defaults", "a site's name comes from its own entry");
  const list = data.sites;
  if (!Array.isArray(list) || list.length === 0) {
    throw new InputError("sites", list, "a list of at least one site, each with a name and plan keys", list === undefined ? "no sites" : Array.isArray(list) ? "an empty list" : "not a list");
  }
  const seen = new Map<string, number>();
  return list.map((entry: unknown, index): CampaignSite => {
    const field = `sites[${index}]`;
    if (!isMapping(entry)) throw new InputError(field, entry, "a mapping with a name and plan keys", "not a mapping");
    checkSiteName(entry.name, `${field}.name`);
    const name = entry.name;
    const key = folderKey(name);
    const first = seen.get(key);
    if (first !== undefined) {
      throw new InputError(`${field}.name`, name, "a name no other site has (compared ignoring case, as folders on many file systems are)", `the same as sites[${first}].name`);
    }
    seen.set(key, index);
    return { name, index, planObject: { ...mergePlanKeys(defaults, entry), name } };
  });
}
