/**
 * campaign.csv against an independent CSV reader: Python's csv module (RFC 4180
 * quoting: fields with commas, quotes or line breaks in double quotes, quotes doubled).
 */
import { describe, expect, it } from "vitest";
import { HAS_PYTHON, pythonCsvRows } from "./helpers.js";
import { CAMPAIGN_CSV_COLUMNS, campaignCsv, csvField } from "../../src/campaign/csv.js";
import type { SiteFigures } from "../../src/campaign/types.js";

const figures: SiteFigures = { areaM2: 19599.7, flights: 1, batteries: 1, photos: 33, flightTimeS: 218.9, withinBandPct: 38.321, flaggedPct: 68.138 };

describe.skipIf(!HAS_PYTHON)("campaign.csv", () => {
  it("reads back through Python's csv module: the ten columns, names and errors with commas, quotes and line breaks intact", () => {
    const rows = [
      { name: "Gorge UTM 32", outcome: { status: "planned" as const, figures } },
      { name: 'West, "outside" <the DEM>', outcome: { status: "failed" as const, error: 'dem.tif: the requested area lies outside the DEM, "west"' } },
      { name: "Two\nlines", outcome: { status: "skipped" as const, figures: { ...figures, photos: 65 } } },
    ];
    const parsed = pythonCsvRows(campaignCsv(rows));
    expect(parsed[0]).toEqual(["name", "area_m2", "flights", "batteries", "photos", "flight_time_s", "within_band_pct", "flagged_pct", "status", "error"]);
    expect(parsed[0]).toEqual([...CAMPAIGN_CSV_COLUMNS]);
    expect(parsed[1]).toEqual(["Gorge UTM 32", "19599.7", "1", "1", "33", "218.9", "38.321", "68.138", "planned", ""]);
    expect(parsed[2]).toEqual(['West, "outside" <the DEM>', "", "", "", "", "", "", "", "failed", 'dem.tif: the requested area lies outside the DEM, "west"']);
    expect(parsed[3][0]).toBe("Two\nlines");
    expect(parsed[3][4]).toBe("65");
    expect(parsed[3][8]).toBe("skipped (current)");
    expect(parsed).toHaveLength(4);
  });

  it("quotes only what RFC 4180 says must be quoted", () => {
    expect(csvField("plain")).toBe("plain");
    expect(csvField('a "b"')).toBe('"a ""b"""');
    expect(csvField("a,b")).toBe('"a,b"');
    expect(csvField(undefined)).toBe("");
  });
});
