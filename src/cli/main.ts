#!/usr/bin/env node
// The CLI's entry as tsc compiles it (dist/cli/main.js). Users run the bundled one
// (package.json's bin, dist/bundle/main.js: the same runCli, scripts/bundle.mjs).
import { runCli } from "./program.js";

await runCli(process.argv);
