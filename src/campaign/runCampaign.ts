/**
 * `gsdplan campaign`: many sites from one campaign file, each planned into its own
 * folder exactly as `gsdplan plan` would plan it alone, in parallel on worker threads;
 * then campaign.csv and index.html at the top. Sites whose outputs are current (same
 * inputs hash) are skipped, so an interrupted campaign resumes where it stopped.
 */
import path from "node:path";
import { InputError } from "../errors.js";
import { writeOutputSet } from "../export/atomicDir.js";
import { resolvePlanOptions, type PlanOptions } from "../plan/options.js";
import { OUTPUT_NAMES } from "../plan/outputs.js";
import { assertWritableTarget } from "../cli/planCommand.js";
import { packageVersion } from "../packageRoot.js";
import { readCampaignFile } from "./campaignFile.js";
import { campaignCsv } from "./csv.js";
import { currentFigures } from "./figures.js";
import { campaignIndexHtml, reportHref } from "./indexHtml.js";
import { inputsHash, type FingerprintCache } from "./inputsHash.js";
import { siteOutline } from "./outlines.js";
import { overviewMap } from "./overviewMap.js";
import { runSiteJobs } from "./pool.js";
import { errorLine } from "./siteJob.js";
import type { SiteJob, SiteOutcome, SiteStage } from "./types.js";

export interface CampaignRunOptions {
  outDir: string;
  /** Worker threads planning sites at once (at least 1). */
  jobs: number;
  /** Re-plan every site, current or not. */
  force?: boolean;
  /** Hooks for a progress display. */
  onStart?: (toPlan: number) => void;
  onStage?: (name: string, stage: SiteStage) => void;
  onSiteEnd?: (name: string, outcome: SiteOutcome) => void;
  /** Worker module to use (tests); default the compiled one beside this module. */
  workerUrl?: URL | null;
}

export interface CampaignResult {
  sites: { name: string; outcome: SiteOutcome; dir: string }[];
  csvPath: string;
  indexPath: string;
  failed: number;
}

/**
 * Runs a campaign. Throws InputError / InputFileError (nothing written) for a bad
 * campaign file or --out; a site's own failure is recorded in its row instead.
 * @example const r = await runCampaign("sites.yaml", { outDir: "out", jobs: 2 }); r.failed // 0
 */
export async function runCampaign(campaignFile: string, o: CampaignRunOptions): Promise<CampaignResult> {
  if (!Number.isInteger(o.jobs) || o.jobs < 1) throw new InputError("--jobs", o.jobs, "a whole number >= 1", "not a number of threads");
  const campaign = await readCampaignFile(campaignFile);
  await assertWritableTarget(o.outDir);
  const outDir = path.resolve(o.outDir);
  const version = packageVersion();

  const outcomes = new Map<number, SiteOutcome>();
  const optionsOf = new Map<number, PlanOptions>();
  const jobs: SiteJob[] = [];
  const fingerprints: FingerprintCache = new Map();
  for (const site of campaign.sites) {
    const siteDir = path.join(outDir, site.name);
    try {
      // Relative paths in the campaign file resolve against its folder, as in a plan file.
      const options = resolvePlanOptions(site.planObject, {}, campaign.dir);
      optionsOf.set(site.index, options);
      const hash = await inputsHash(options, version, fingerprints);
      const current = o.force ? null : await currentFigures(siteDir, hash, OUTPUT_NAMES);
      if (current) outcomes.set(site.index, { status: "skipped", figures: current });
      else jobs.push({ index: site.index, name: site.name, options, outDir: siteDir, planFile: campaign.file, inputsHash: hash });
    } catch (e) {
      outcomes.set(site.index, { status: "failed", error: errorLine(e) });
    }
  }

  o.onStart?.(jobs.length);
  const nameOf = new Map(campaign.sites.map((s) => [s.index, s.name]));
  await runSiteJobs(
    jobs,
    o.jobs,
    (m) => {
      const name = nameOf.get(m.index)!;
      if (m.type === "stage") return o.onStage?.(name, m.stage);
      const outcome: SiteOutcome = m.type === "done" ? { status: "planned", figures: m.figures } : { status: "failed", error: m.error };
      outcomes.set(m.index, outcome);
      o.onSiteEnd?.(name, outcome);
    },
    o.workerUrl,
  );

  const sites = campaign.sites.map((s) => ({
    name: s.name,
    outcome: outcomes.get(s.index) ?? { status: "failed" as const, error: "internal error: the site was not planned" },
    dir: path.join(outDir, s.name),
  }));
  const mapSites = [];
  for (const [i, s] of sites.entries()) {
    const failed = s.outcome.status === "failed";
    const area = optionsOf.get(i)?.area;
    const polygons = await siteOutline(failed ? (area ? { areaFile: area } : {}) : { planGeoJson: path.join(s.dir, "plan.geojson") });
    mapSites.push({ number: i + 1, name: s.name, failed, polygons });
  }
  const html = campaignIndexHtml({
    campaignFile: path.basename(campaign.file),
    sites: sites.map((s, i) => ({
      number: i + 1,
      name: s.name,
      outcome: s.outcome,
      ...(s.outcome.status === "failed" ? {} : { reportHref: reportHref(s.name) }),
    })),
    map: overviewMap(mapSites),
    generatedAt: new Date().toISOString(),
    toolVersion: version,
  });
  await writeOutputSet(outDir, [
    { name: "campaign.csv", data: campaignCsv(sites) },
    { name: "index.html", data: html },
  ], { force: true });
  return {
    sites,
    csvPath: path.join(outDir, "campaign.csv"),
    indexPath: path.join(outDir, "index.html"),
    failed: sites.filter((s) => s.outcome.status === "failed").length,
  };
}
