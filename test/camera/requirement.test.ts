import { describe, it, expect } from "vitest";
import { requirementFrom, PIXELS_ACROSS_FEATURE, REQUIREMENT_HELP, type RequirementInput } from "../../src/camera/requirement.js";
import { InputError } from "../../src/errors.js";

function fieldOf(fn: () => unknown): string | undefined {
  try {
    fn();
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    return (e as InputError).field;
  }
  return undefined;
}

describe("requirement from a GSD", () => {
  it("2 cm/px at 10 %: band [1.8, 2.2] cm/px", () => {
    const r = requirementFrom({ gsdCm: 2 }, 10);
    expect(r.targetGsdM).toBeCloseTo(0.02, 12);
    expect(r.lowGsdM).toBeCloseTo(0.018, 12);
    expect(r.highGsdM).toBeCloseTo(0.022, 12);
    expect(r.tolerance).toBeCloseTo(0.1, 12);
    expect(r.derivation).toMatch(/2 cm\/px as given.*1\.8-2\.2 cm\/px/);
  });
});

describe("requirement from the smallest feature", () => {
  it("one-tenth rule: pixel = feature / 10 (common practice)", () => {
    const r = requirementFrom({ smallestFeatureCm: 20, rule: "tenth" }, 10);
    expect(r.targetGsdM).toBeCloseTo(0.02, 12);
    expect(r.derivation).toMatch(/tenth/);
  });

  it("Johnson (1958): detection 1 lp = 2 px, recognition 4 lp = 8 px, identification 6.4 lp = 12.8 px", () => {
    // Johnson's criteria as published (1958): 1.0, 4.0 and 6.4 line pairs across the
    // critical dimension; a line pair is two pixels (one dark, one light).
    expect(PIXELS_ACROSS_FEATURE.detection).toBe(2 * 1);
    expect(PIXELS_ACROSS_FEATURE.recognition).toBe(2 * 4);
    expect(PIXELS_ACROSS_FEATURE.identification).toBe(2 * 6.4);
    // 64 cm feature: 32, 8 and 5 cm/px
    expect(requirementFrom({ smallestFeatureCm: 64, rule: "detection" }, 5).targetGsdM).toBeCloseTo(0.32, 12);
    expect(requirementFrom({ smallestFeatureCm: 64, rule: "recognition" }, 5).targetGsdM).toBeCloseTo(0.08, 12);
    const id = requirementFrom({ smallestFeatureCm: 64, rule: "identification" }, 5);
    expect(id.targetGsdM).toBeCloseTo(0.05, 12);
    expect(id.derivation).toMatch(/Johnson.*identification.*64 \/ 12\.8 = 5 cm\/px/);
  });

  it("the help text explains every option", () => {
    for (const w of ["tenth", "detection", "recognition", "identification", "tolerance", "Johnson (1958)", "common practice"]) {
      expect(REQUIREMENT_HELP).toContain(w);
    }
  });
});

describe("bad requirement input", () => {
  it("tolerance not in (0, 100)", () => {
    for (const t of [0, 100, -5, 150, Number.NaN]) expect(fieldOf(() => requirementFrom({ gsdCm: 2 }, t))).toBe("tolerancePct");
    expect(() => requirementFrom({ gsdCm: 2 }, 99.9)).not.toThrow();
  });

  it("non-positive GSD or feature, unknown rule, both or neither", () => {
    expect(fieldOf(() => requirementFrom({ gsdCm: 0 }, 10))).toBe("gsdCm");
    expect(fieldOf(() => requirementFrom({ smallestFeatureCm: -3, rule: "tenth" }, 10))).toBe("smallestFeatureCm");
    expect(fieldOf(() => requirementFrom({ smallestFeatureCm: 30, rule: "glance" } as unknown as RequirementInput, 10))).toBe("rule");
    expect(fieldOf(() => requirementFrom({ gsdCm: 2, smallestFeatureCm: 20, rule: "tenth" } as unknown as RequirementInput, 10))).toBe("smallestFeatureCm");
    expect(fieldOf(() => requirementFrom({} as RequirementInput, 10))).toBe("gsdCm");
  });
});
