import { InputError } from "../errors.js";
import type { Requirement } from "./types.js";
import { openInterval, positiveNumber } from "./validate.js";

/** How a smallest feature becomes a pixel size. */
export type FeatureRule = "tenth" | "detection" | "recognition" | "identification";

/** The detail asked for: a GSD directly, or the smallest feature to resolve and a rule. */
export type RequirementInput = { gsdCm: number } | { smallestFeatureCm: number; rule: FeatureRule };

/**
 * Pixels across the feature's critical dimension for each rule.
 * tenth: a pixel of about a tenth of the smallest feature (common practice).
 * detection / recognition / identification: Johnson's criteria (J. Johnson,
 * "Analysis of image forming systems", Image Intensifier Symposium, 1958):
 * 1, 4 and 6.4 line pairs across the critical dimension, two pixels per line pair.
 */
export const PIXELS_ACROSS_FEATURE: Readonly<Record<FeatureRule, number>> = {
  tenth: 10,
  detection: 2,
  recognition: 8,
  identification: 12.8,
};

const RULE_WORDS: Record<FeatureRule, string> = {
  tenth: "one-tenth rule (a pixel of about a tenth of the smallest feature; common practice)",
  detection: "Johnson's detection criterion (1958: 1 line pair = 2 px across the feature)",
  recognition: "Johnson's recognition criterion (1958: 4 line pairs = 8 px across the feature)",
  identification: "Johnson's identification criterion (1958: 6.4 line pairs = 12.8 px across the feature)",
};

/** Help text for the requirement options (shown by the CLI in --help). */
export const REQUIREMENT_HELP = [
  "Detail required (give one):",
  "  gsd <cm>                 target ground sample distance in cm per pixel (nadir).",
  "  feature <cm> + rule      smallest feature to resolve, in cm, and how many pixels it must span:",
  "    tenth           pixel = feature / 10. A common rule of thumb for mapping (common practice).",
  "    detection       pixel = feature / 2. Johnson (1958): 1 line pair across the feature is enough",
  "                    to tell that something is there.",
  "    recognition     pixel = feature / 8. Johnson (1958): 4 line pairs, enough to tell what kind",
  "                    of thing it is.",
  "    identification  pixel = feature / 12.8. Johnson (1958): 6.4 line pairs, enough to tell which",
  "                    one it is.",
  "  tolerance <percent>      allowed GSD band, target x (1 - t) to target x (1 + t); 0 < t < 100.",
  "Johnson's figures were measured for human observers of image-intensifier displays; treat them as",
  "a published scale, not a guarantee for a given survey.",
].join("\n");

const RULES = Object.keys(PIXELS_ACROSS_FEATURE) as FeatureRule[];

/**
 * The GSD band the plan must hold: target GSD from a direct figure or from
 * the smallest feature and a rule, band [target(1 - t), target(1 + t)], with a
 * derivation in words for the summary.
 *
 * @example requirementFrom({ gsdCm: 2 }, 10)                                   // target 0.02 m, band 0.018-0.022
 * @example requirementFrom({ smallestFeatureCm: 20, rule: "recognition" }, 15) // target 0.025 m
 */
export function requirementFrom(input: RequirementInput, tolerancePct: number): Requirement {
  if (input === null || typeof input !== "object") {
    throw new InputError("requirement", input, "{ gsdCm } or { smallestFeatureCm, rule }");
  }
  const tol = openInterval("tolerancePct", tolerancePct, 0, 100, "a percentage greater than 0 and less than 100") / 100;
  const i = input as unknown as Record<string, unknown>;
  const hasGsd = i.gsdCm !== undefined;
  const hasFeature = i.smallestFeatureCm !== undefined;
  if (hasGsd === hasFeature) {
    throw new InputError(
      hasGsd ? "smallestFeatureCm" : "gsdCm",
      hasGsd ? i.smallestFeatureCm : undefined,
      "either gsdCm, or smallestFeatureCm with a rule",
      hasGsd ? "both a GSD and a smallest feature given" : "neither a GSD nor a smallest feature given",
    );
  }
  let targetCm: number;
  let how: string;
  if (hasGsd) {
    targetCm = positiveNumber("gsdCm", i.gsdCm);
    how = `target GSD ${fmt(targetCm)} cm/px as given`;
  } else {
    const featureCm = positiveNumber("smallestFeatureCm", i.smallestFeatureCm);
    const rule = i.rule;
    if (typeof rule !== "string" || !RULES.includes(rule as FeatureRule)) {
      throw new InputError("rule", rule, RULES.join(" | "));
    }
    const px = PIXELS_ACROSS_FEATURE[rule as FeatureRule];
    targetCm = featureCm / px;
    how = `smallest feature ${fmt(featureCm)} cm, ${RULE_WORDS[rule as FeatureRule]}: ${fmt(featureCm)} / ${px} = ${fmt(targetCm)} cm/px`;
  }
  const targetGsdM = targetCm / 100;
  const lowGsdM = targetGsdM * (1 - tol);
  const highGsdM = targetGsdM * (1 + tol);
  return {
    targetGsdM,
    lowGsdM,
    highGsdM,
    tolerance: tol,
    derivation: `${how}; band ${fmt(lowGsdM * 100)}-${fmt(highGsdM * 100)} cm/px (tolerance ${fmt(tol * 100)} %)`,
  };
}

/** Up to 3 decimals, no trailing zeros: 2 -> "2", 2.5 -> "2.5", 1.5625 -> "1.563". */
function fmt(v: number): string {
  return String(Number(v.toFixed(3)));
}
