import { describe, it, expect } from "vitest";
import { existsSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { makeReportInput } from "./fixture.js";
import { renderReport } from "../../src/report/render.js";
import type { reportHtmlInBackground as Background } from "../../src/report/background.js";

// The worker thread runs only from the built library (`npm test` builds it first).
const dist = new URL("../../dist/report/background.js", import.meta.url);
const HAS_DIST = existsSync(fileURLToPath(dist)) && existsSync(fileURLToPath(new URL("renderWorker.js", dist)));
if (!HAS_DIST && process.env.CI === "true") throw new Error("dist/ is required under CI=true (npm test builds it first)");

describe.skipIf(!HAS_DIST)("report page rendered in a worker thread", () => {
  it("is the page rendered on this thread, character for character", async () => {
    const { reportHtmlInBackground } = (await import(dist.href)) as { reportHtmlInBackground: typeof Background };
    const input = makeReportInput({ siteName: "Worker check" });
    const page = reportHtmlInBackground(input);
    const html = await page.html();
    expect(html.length).toBeGreaterThan(10_000);
    expect(html).toContain("Worker check");
    expect(html).toBe(renderReport(input));
  });
});
