import { describe, it, expect } from "vitest";
import { fixed1, fmt } from "../../src/report/format.js";
import { seededRandom } from "../geo/projCli.js";

/** A seeded generator (mulberry32), so a failure can be replayed. */
const rng = seededRandom;

// ECMA-262 Number.prototype.toFixed is the reference: fixed1 must give its text exactly.
describe("fixed1 against Number.prototype.toFixed(1)", () => {
  it("random coordinates, values on or near the halves, zeros, signs and huge or non-finite values", () => {
    const r = rng(42);
    const values: number[] = [0, -0, 0.05, -0.05, 0.25, 0.35, 1.45, 2.5, -2.55, 0.04999999999999999, 1e7, -1e7, 9999999.95, 123456.75, 1e21, NaN, Infinity, -Infinity];
    for (let i = 0; i < 200000; i++) {
      values.push((r() - 0.3) * 1000, (r() - 0.5) * 0.2, Math.round(r() * 1e5) / 100, Math.round(r() * 1e4) / 20 - 100, 46 + r() * 446);
    }
    let differ = 0;
    for (const v of values) if (fixed1(v) !== v.toFixed(1)) differ++;
    expect(differ).toBe(0);
    expect(fixed1(-0.04)).toBe("-0.0"); // toFixed keeps the sign of a negative value that rounds to zero
  });
});

// ECMA-402: Number.prototype.toLocaleString(locales, options) formats as
// new Intl.NumberFormat(locales, options).format does.
describe("fmt with its formatters made once", () => {
  it("the text toLocaleString gives, for each count of decimals", () => {
    for (const v of [0, 1234.567, -0.5, 2.345, 15.0072352, 1e9 + 0.25])
      for (const d of [0, 1, 2, 5, 8]) expect(fmt(v, d)).toBe(v.toLocaleString("en-GB", { minimumFractionDigits: d, maximumFractionDigits: d }));
    expect(fmt(1234.567)).toBe("1,235");
    expect(fmt(2.345)).toBe("2.35");
  });
});
