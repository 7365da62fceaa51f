import { existsSync } from "node:fs";
import type { Browser } from "playwright-core";

/** Debian's chromium, driven by playwright-core (never a downloaded browser). */
export const CHROMIUM = "/usr/bin/chromium";

/**
 * True when Chromium can be used; prints a skip notice, or throws under CI=true
 * when it is missing (like test/helpers/tools.ts does for GDAL and PROJ).
 */
export function requireChromium(what: string): boolean {
  if (existsSync(CHROMIUM)) return true;
  if (process.env.CI === "true") throw new Error(`${CHROMIUM} (Debian package chromium) is required under CI=true but was not found`);
  process.stderr.write(`NOTICE: ${CHROMIUM} not found (install Debian's chromium); skipping ${what}\n`);
  return false;
}

/** Launches headless Chromium with the flags this closed-network machine needs. */
export async function launchChromium(): Promise<Browser> {
  const { chromium } = await import("playwright-core");
  return chromium.launch({
    executablePath: CHROMIUM,
    args: ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
  });
}
