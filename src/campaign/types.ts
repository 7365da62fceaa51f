/**
 * Contract types of the campaign stage: a site as read from the campaign file, the
 * job a worker plans, what it reports back, and one row of campaign.csv.
 */
import type { PlanOptions } from "../plan/options.js";
import type { PlanStage } from "../plan/plan.js";

/** A site of the campaign file, its plan keys merged over the defaults (not yet validated). */
export interface CampaignSite {
  /** The site's name: its folder under --out and the plan's `name`. */
  name: string;
  /** Position in the campaign file's `sites` list, from 0. */
  index: number;
  /** The plan keys for this site (defaults with the site's own keys over them, `name` included). */
  planObject: Record<string, unknown>;
}

/** A campaign file, read and checked. */
export interface CampaignFile {
  /** Absolute path of the file. */
  file: string;
  /** Its folder: relative paths in it resolve against it. */
  dir: string;
  sites: CampaignSite[];
}

/** One site to plan, as sent to a worker (structured-clone safe). */
export interface SiteJob {
  index: number;
  name: string;
  options: PlanOptions;
  /** Absolute path of the site's output folder. */
  outDir: string;
  /** The campaign file (named in the report as the plan file). */
  planFile: string;
  /** Written into summary.json as `inputsHash`. */
  inputsHash: string;
}

/** Stages a site passes through, as a worker reports them. */
export type SiteStage = PlanStage | "write";

/** The figures campaign.csv and index.html show, taken from a site's summary.json. */
export interface SiteFigures {
  areaM2: number;
  flights: number;
  batteries: number;
  photos: number;
  flightTimeS: number;
  withinBandPct: number;
  flaggedPct: number;
}

/** How a site ended. */
export type SiteOutcome =
  | { status: "planned"; figures: SiteFigures }
  | { status: "skipped"; figures: SiteFigures }
  | { status: "failed"; error: string };

/** Messages from a worker to the runner. */
export type WorkerMessage =
  | { type: "stage"; index: number; stage: SiteStage }
  | { type: "done"; index: number; figures: SiteFigures }
  | { type: "failed"; index: number; error: string };

/** The text a site's status is written as in campaign.csv and index.html. */
export const STATUS_TEXT: Record<SiteOutcome["status"], string> = {
  planned: "planned",
  skipped: "skipped (current)",
  failed: "failed",
};
