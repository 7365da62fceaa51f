import type { Command } from "commander";
import path from "node:path";
import { readFile } from "node:fs/promises";
import { InputFileError } from "../../errors.js";
import { parseReportInput } from "../../report/serialize.js";
import { renderReport } from "../../report/render.js";
import { writeOutputSet } from "../../export/atomicDir.js";

/**
 * `gsdplan report <out-dir>`: re-renders report.html from a finished output
 * folder's report-data.json (written atomically, replacing the old page).
 * @example registerReport(program)
 */
export function registerReport(program: Command): void {
  program
    .command("report")
    .argument("<out-dir>", "a folder written by `gsdplan plan`")
    .description("re-render report.html from a finished plan's output folder (reads report-data.json)")
    .action(async (outDir: string) => {
      const dataPath = path.join(outDir, "report-data.json");
      let text: string;
      try {
        text = await readFile(dataPath, "utf8");
      } catch {
        throw new InputFileError(dataPath, "not found: is this a folder written by `gsdplan plan`?");
      }
      const html = renderReport(parseReportInput(text, dataPath));
      await writeOutputSet(outDir, [{ name: "report.html", data: html }], { force: true, field: "<out-dir>" });
      process.stdout.write(`report written: ${path.join(outDir, "report.html")}\n`);
    });
}
