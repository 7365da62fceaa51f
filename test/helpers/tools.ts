import { execFileSync } from "node:child_process";

/**
 * Outside reference tools (GDAL, PROJ, Chromium) from Debian's packages.
 * Tests that need one run when it is present; otherwise they are skipped
 * with a printed notice. Under CI=true a missing tool fails the run instead.
 */
export function hasTool(cmd: string, args: string[] = ["--version"]): boolean {
  try {
    execFileSync(cmd, args, { stdio: "ignore" });
    return true;
  } catch {
    return false;
  }
}

const notified = new Set<string>();

/** Returns true when `cmd` can be used; prints a skip notice, or throws under CI. */
export function requireTool(cmd: string, pkg: string, args?: string[]): boolean {
  if (hasTool(cmd, args)) return true;
  if (process.env.CI === "true") {
    throw new Error(`${cmd} (Debian package ${pkg}) is required under CI=true but was not found`);
  }
  if (!notified.has(cmd)) {
    notified.add(cmd);
    process.stderr.write(`NOTICE: ${cmd} not found (install Debian's ${pkg}); skipping the tests that compare against it\n`);
  }
  return false;
}

export const HAS_GDAL = requireTool("gdalinfo", "gdal-bin");
export const HAS_PROJ = requireTool("cs2cs", "proj-bin", ["-l"]);
