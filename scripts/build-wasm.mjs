// Compiles the WebAssembly kernels (src/**/*.as.ts, AssemblyScript) into dist/ beside the
// JavaScript tsc makes from the same folder: src/assess/footprintRows.as.ts ->
// dist/assess/footprintRows.wasm. The code finds them from the package root
// (src/wasmKernel.ts), so the bundle (dist/bundle/) and the tests (run from src/) read the
// same file; without it they fall back to the JavaScript kernels.
//
// Options: optimised (-O3), the smallest runtime (no garbage collector: the kernels keep
// no objects), no bounds assertions (the callers size the memory), 128-bit SIMD (Node 20's
// engine has it).
//
// Usage: node scripts/build-wasm.mjs   (run by `npm run build` after tsc)
import { mkdirSync, readdirSync } from "node:fs";
import { dirname, join, relative } from "node:path";
import { fileURLToPath } from "node:url";
import asc from "assemblyscript/asc";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");

function sources(dir) {
  return readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const p = join(dir, e.name);
    return e.isDirectory() ? sources(p) : e.name.endsWith(".as.ts") ? [p] : [];
  });
}

for (const src of sources(join(root, "src"))) {
  const out = join(root, "dist", relative(join(root, "src"), src)).replace(/\.as\.ts$/, ".wasm");
  mkdirSync(dirname(out), { recursive: true });
  const { error, stderr } = await asc.main([relative(process.cwd(), src), "-O3", "--runtime", "stub", "--noAssert", "--enable", "simd", "--outFile", out]);
  if (error) {
    process.stderr.write(stderr.toString());
    throw error;
  }
  console.log(`wasm: ${relative(root, out)}`);
}
