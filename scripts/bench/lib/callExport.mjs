// Runs one exported benchmark function of another script in this (child) process and prints
// its result as one JSON line, so the runner can measure it under GNU time on its own.
// Usage: node lib/callExport.mjs <module path> <export name> [<JSON argument>]
import { pathToFileURL } from "node:url";
import { resolve } from "node:path";

const [modulePath, exportName, arg] = process.argv.slice(2);
const mod = await import(pathToFileURL(resolve(modulePath)).href);
if (typeof mod[exportName] !== "function") throw new Error(`${modulePath} has no exported function ${exportName}`);
const result = await mod[exportName](arg ? JSON.parse(arg) : undefined);
process.stdout.write("\n" + JSON.stringify(result) + "\n");
