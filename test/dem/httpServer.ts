/**
 * A local HTTP file server for the remote-DEM tests, started inside the test on 127.0.0.1
 * (port 0: the system picks a free one). Range requests follow RFC 9110, section 14
 * (one "bytes=first-last" range answered 206 with Content-Range "bytes first-last/size").
 * It counts the body bytes it sends, so a test can bound what a reader fetched.
 * Modes: "range" serves ranges; "no-range" ignores Range and answers 200 with the whole
 * file (what a plain static server without Range support does); "stall" accepts the
 * request and never answers; "stall-body" sends the headers of a 206 and then stalls.
 */
import { createServer, type Server, type ServerResponse } from "node:http";
import { readFileSync } from "node:fs";
import path from "node:path";
import type { AddressInfo, Socket } from "node:net";

export type ServeMode = "range" | "no-range" | "stall" | "stall-body";

export interface FileServer {
  /** URL of a file below the served folder. */
  url(relative: string): string;
  /** Body bytes sent since the start or the last reset. */
  bytesSent: number;
  requests: number;
  /** The Range headers received, in order. */
  ranges: string[];
  reset(): void;
  close(): Promise<void>;
}

/**
 * Serves the files below `root` in the given mode.
 * @example const srv = await serveFiles("fixtures", "range"); srv.url("gdal/hills_utm33_f32.tif")
 */
export async function serveFiles(root: string, mode: ServeMode): Promise<FileServer> {
  const sockets = new Set<Socket>();
  const cache = new Map<string, Buffer>();
  const state: FileServer = {
    url: (rel) => `http://127.0.0.1:${(server.address() as AddressInfo).port}/${rel.split(path.sep).map(encodeURIComponent).join("/")}`,
    bytesSent: 0,
    requests: 0,
    ranges: [],
    reset() {
      state.bytesSent = 0;
      state.requests = 0;
      state.ranges = [];
    },
    close: () =>
      new Promise<void>((resolve) => {
        for (const s of sockets) s.destroy();
        server.close(() => resolve());
      }),
  };
  const send = (res: ServerResponse, status: number, headers: Record<string, string | number>, body: Buffer) => {
    res.writeHead(status, headers);
    state.bytesSent += body.byteLength;
    res.end(body);
  };
  const server: Server = createServer((req, res) => {
    state.requests++;
    const range = req.headers.range ?? "";
    state.ranges.push(range);
    if (mode === "stall") return; // never answers
    const file = path.join(root, decodeURIComponent(new URL(req.url ?? "/", "http://x").pathname));
    if (!file.startsWith(path.resolve(root))) return send(res, 403, {}, Buffer.alloc(0));
    let data = cache.get(file);
    if (!data) {
      try {
        data = readFileSync(file);
      } catch {
        return send(res, 404, { "Content-Type": "text/plain" }, Buffer.from("not found"));
      }
      cache.set(file, data);
    }
    const m = /^bytes=(\d+)-(\d*)$/.exec(range);
    if (mode === "no-range" || !m) return send(res, 200, { "Content-Type": "image/tiff", "Content-Length": data.byteLength }, data);
    const first = Number(m[1]);
    const last = Math.min(data.byteLength - 1, m[2] === "" ? data.byteLength - 1 : Number(m[2]));
    if (first >= data.byteLength) return send(res, 416, { "Content-Range": `bytes */${data.byteLength}` }, Buffer.alloc(0));
    const body = data.subarray(first, last + 1);
    const headers = { "Content-Type": "image/tiff", "Accept-Ranges": "bytes", "Content-Range": `bytes ${first}-${last}/${data.byteLength}`, "Content-Length": body.byteLength };
    if (mode === "stall-body") {
      res.writeHead(206, headers);
      res.write(body.subarray(0, Math.min(4, body.byteLength)));
      state.bytesSent += Math.min(4, body.byteLength);
      return; // the rest never comes
    }
    send(res, 206, headers, body);
  });
  server.on("connection", (s) => {
    sockets.add(s);
    s.on("close", () => sockets.delete(s));
  });
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
  return state;
}
