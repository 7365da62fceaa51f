import { readFileSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { packageRoot } from "../../src/packageRoot.js";

// The folder files read at run time are found from (the demo's plan, package.json's version):
// the repository root, two folders above this test file, from src/ here and from
// dist/bundle/ in the built CLI (test/e2e runs the demo through it).
describe("packageRoot", () => {
  it("is the folder of gsdplan's package.json", () => {
    const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..", "..");
    expect(packageRoot()).toBe(root);
    expect(JSON.parse(readFileSync(path.join(packageRoot(), "package.json"), "utf8")).name).toBe("gsdplan");
  });
});
