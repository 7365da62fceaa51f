import { createRequire } from "node:module";

const load = createRequire(import.meta.url);

/**
 * A module loaded on first use rather than when gsdplan is loaded. Every plan's start loaded
 * node:http and node:https (remote DEMs) and the XML parser (VRT mosaics, KML and GPX sites):
 * ~12 ms of the single-threaded start, for inputs most plans do not have. Required by name at
 * run time, so the bundler leaves the module where the package manager put it (a Node
 * built-in, or a dependency in node_modules) instead of putting it in the bundle.
 * @example const https = lazyModule<typeof import("node:https")>("node:https"); https().get(url)
 */
export function lazyModule<T>(id: string): () => T {
  let module: T | undefined;
  return () => (module ??= load(id) as T);
}

/** The XML parser (VRT mosaics, KML and GPX sites), one handle for its readers. */
export const xmldom = lazyModule<typeof import("@xmldom/xmldom")>("@xmldom/xmldom");
