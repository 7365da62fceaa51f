import type http from "node:http";
import { BaseClient, BaseResponse, fromCustomClient, type GeoTIFF } from "geotiff";
import { lazyModule } from "../lazyModule.js";
import { InputFileError } from "../errors.js";

/** node:http and node:https, loaded when a remote DEM is read (lazyModule.ts). */
const httpModule = lazyModule<typeof import("node:http")>("node:http");
const httpsModule = lazyModule<typeof import("node:https")>("node:https");

/** How a GeoTIFF over HTTP(S) is fetched. */
export interface HttpOptions {
  /** Longest wait for one request, headers and body, in milliseconds (default 30 000). */
  timeoutMs?: number;
  /** Further attempts after a time-out, a network error or a 5xx answer (default 2). */
  retries?: number;
  /** Bytes per cached block; contiguous missing blocks go in one range request (default 16 KiB). */
  blockBytes?: number;
  /** Blocks kept in the cache (default 512, so 8 MiB at the default block size). */
  cacheBlocks?: number;
}

export const DEFAULT_HTTP_TIMEOUT_MS = 30_000;
export const DEFAULT_HTTP_RETRIES = 2;
// Small blocks keep the over-read per range request small (at most a block at each end of a
// run of contiguous tiles); the block cache groups contiguous blocks into one request.
const DEFAULT_BLOCK_BYTES = 16 * 1024;
const DEFAULT_CACHE_BLOCKS = 512;

/** A response whose body was read inside the time-out (so a stalled body is a time-out too). */
class BufferedResponse extends BaseResponse {
  constructor(private readonly code: number, private readonly headers: http.IncomingHttpHeaders, private readonly data: ArrayBuffer) {
    super();
  }
  override get status(): number {
    return this.code;
  }
  override getHeader(name: string): string | undefined {
    const v = this.headers[name.toLowerCase()];
    return Array.isArray(v) ? v.join(", ") : v;
  }
  override async getData(): Promise<ArrayBuffer> {
    return this.data;
  }
}

/**
 * The geotiff package's HTTP client with a time-out per request, a few retries, and a
 * refusal of any answer that is not a partial one (206): a server that ignores Range would
 * otherwise send the whole file. The first failure is kept as a one-line InputFileError,
 * because geotiff's block cache reports failed blocks only as "Request failed".
 */
export class RangeClient extends BaseClient {
  failure: InputFileError | null = null;
  /** Body bytes received, over all requests. */
  bytesReceived = 0;
  requests = 0;
  readonly timeoutMs: number;
  readonly retries: number;

  constructor(url: string, opts: HttpOptions = {}) {
    super(url);
    this.timeoutMs = opts.timeoutMs ?? DEFAULT_HTTP_TIMEOUT_MS;
    this.retries = opts.retries ?? DEFAULT_HTTP_RETRIES;
  }

  override async request({ headers, signal }: { headers?: Record<string, string>; signal?: AbortSignal } = {}): Promise<BaseResponse> {
    if (this.failure) throw this.failure;
    let last = "";
    for (let attempt = 0; attempt <= this.retries; attempt++) {
      if (attempt > 0) await sleep(Math.min(2000, 100 * 2 ** attempt));
      const timeout = AbortSignal.timeout(this.timeoutMs);
      try {
        this.requests++;
        const res = await get(this.url, headers ?? {}, signal ? AbortSignal.any([signal, timeout]) : timeout);
        if (res.status >= 500) {
          last = `HTTP ${res.status} ${res.statusText}`.trim();
          continue;
        }
        if (res.status !== 206) throw this.failWith(statusProblem(res.status, res.statusText, res.headers));
        this.bytesReceived += res.body.byteLength;
        return new BufferedResponse(res.status, res.headers, res.body);
      } catch (e) {
        if (e instanceof InputFileError) throw e;
        if (signal?.aborted) throw e;
        last = timeout.aborted ? `no answer within ${fmtSeconds(this.timeoutMs)}` : networkProblem(e);
      }
    }
    throw this.failWith(`${last} (${this.retries + 1} attempt${this.retries ? "s" : ""})`);
  }

  /** Records (once) and returns the one-line error of this URL. */
  failWith(problem: string): InputFileError {
    this.failure ??= new InputFileError(this.url, problem);
    return this.failure;
  }
}

/**
 * Asks for the first bytes of a URL with a Range request and returns the file size from
 * Content-Range. A server that answers 200 (it ignores Range and would send the whole file)
 * or anything but 206 is refused in one line before any GeoTIFF reading starts.
 * @example const { fileSize } = await probeRange(new RangeClient("https://example.org/dem.tif"))
 */
export async function probeRange(client: RangeClient): Promise<{ fileSize: number | null }> {
  const res = await client.request({ headers: { Range: "bytes=0-15" } });
  const m = /^bytes\s+(\d+)-(\d+)\/(\d+|\*)$/i.exec((res.getHeader("content-range") ?? "").trim());
  if (!m || Number(m[1]) !== 0) {
    throw new InputFileError(client.url, `the server answered a Range request without a usable Content-Range header ("${res.getHeader("content-range") ?? ""}"); a GeoTIFF over HTTP is read by byte ranges`);
  }
  return { fileSize: m[3] === "*" ? null : Number(m[3]) };
}

/**
 * Opens a GeoTIFF over HTTP(S): a small Range request first (see probeRange), then geotiff's
 * remote source on a client with time-outs and retries, behind its bounded block cache.
 * Only the header and the blocks a reader asks for are fetched.
 * @example const { tiff, client } = await openRemoteTiff("https://example.org/dem.tif", { timeoutMs: 10_000 })
 */
export async function openRemoteTiff(url: string, opts: HttpOptions = {}): Promise<{ tiff: GeoTIFF; client: RangeClient; fileSize: number | null }> {
  const client = new RangeClient(url, opts);
  const { fileSize } = await probeRange(client);
  const tiff = await fromCustomClient(client, { blockSize: opts.blockBytes ?? DEFAULT_BLOCK_BYTES, cacheSize: opts.cacheBlocks ?? DEFAULT_CACHE_BLOCKS } as never);
  return { tiff, client, fileSize };
}

/** A byte range of a file wanted under a key (a block of a GeoTIFF). */
export interface RangeBlock<K> {
  offset: number;
  length: number;
  key: K;
}

// A run of contiguous blocks is fetched in requests of at most this many bytes, this many at once.
const RUN_BYTES = 1024 * 1024;
const RUNS_IN_FLIGHT = 4;

/**
 * Fetches blocks by the runs of contiguous ones (in the order given), RUNS_IN_FLIGHT
 * requests at a time, and hands each block to `use` as its run arrives: the bytes fetched
 * are exactly the blocks' bytes, in few requests. Blocks of 0 bytes come with no request.
 * @example await fetchRuns(client, [{ offset: 1000, length: 500, key: 0 }], async (k, bytes) => decode(bytes))
 */
export async function fetchRuns<K>(client: RangeClient, blocks: readonly RangeBlock<K>[], use: (key: K, bytes: ArrayBuffer) => Promise<void>): Promise<void> {
  const runs: RangeBlock<K>[][] = [];
  let run: RangeBlock<K>[] = [];
  let end = -1, bytes = 0;
  for (const b of blocks) {
    if (b.length === 0) {
      runs.push([b]);
      continue;
    }
    if (!(run.length && b.offset === end && bytes + b.length <= RUN_BYTES)) {
      if (run.length) runs.push(run);
      run = [];
      bytes = 0;
    }
    run.push(b);
    end = b.offset + b.length;
    bytes += b.length;
  }
  if (run.length) runs.push(run);
  let next = 0;
  const worker = async () => {
    while (next < runs.length) {
      const r = runs[next++];
      const first = r[0].offset, last = r[r.length - 1].offset + r[r.length - 1].length;
      const data = last > first ? await (await client.request({ headers: { Range: `bytes=${first}-${last - 1}` } })).getData() : new ArrayBuffer(0);
      if (data.byteLength < last - first) throw client.failWith(`the server sent ${data.byteLength} of the ${last - first} bytes asked for (bytes ${first}-${last - 1})`);
      for (const b of r) await use(b.key, data.slice(b.offset - first, b.offset - first + b.length));
    }
  };
  await Promise.all(Array.from({ length: Math.min(RUNS_IN_FLIGHT, runs.length) }, worker));
}

/**
 * True for the http:// and https:// sources the remote reader takes.
 * @example isHttpUrl("https://example.org/dem.tif") // true
 */
export function isHttpUrl(spec: string): boolean {
  return /^https?:\/\//i.test(spec);
}

/**
 * One GET with node:http(s) (several times faster than fetch on large bodies), the body
 * read whole unless the status is not 206 (then it is dropped unread: a server ignoring
 * Range would send the whole file). Redirects are followed, five at most.
 */
function get(url: string, headers: Record<string, string>, signal: AbortSignal, hops = 0): Promise<{ status: number; statusText: string; headers: http.IncomingHttpHeaders; body: ArrayBuffer }> {
  return new Promise((resolve, reject) => {
    const lib = url.startsWith("https:") ? httpsModule() : httpModule();
    const req = lib.get(url, { headers, signal }, (res) => {
      const status = res.statusCode ?? 0;
      const location = res.headers.location;
      if (status >= 300 && status < 400 && location && hops < 5) {
        res.resume();
        get(new URL(location, url).href, headers, signal, hops + 1).then(resolve, reject);
        return;
      }
      if (status !== 206) {
        res.destroy();
        resolve({ status, statusText: res.statusMessage ?? "", headers: res.headers, body: new ArrayBuffer(0) });
        return;
      }
      const chunks: Buffer[] = [];
      res.on("data", (c: Buffer) => chunks.push(c));
      res.on("end", () => {
        const all = Buffer.concat(chunks);
        // A large Buffer owns its memory whole: hand it on without a copy.
        const own = all.byteOffset === 0 && all.buffer.byteLength === all.byteLength;
        resolve({ status, statusText: res.statusMessage ?? "", headers: res.headers, body: (own ? all.buffer : all.buffer.slice(all.byteOffset, all.byteOffset + all.byteLength)) as ArrayBuffer });
      });
      res.on("error", reject);
      res.on("aborted", () => reject(new Error("connection closed in the middle of the body")));
    });
    req.on("error", reject);
  });
}

function statusProblem(status: number, statusText: string, headers: http.IncomingHttpHeaders): string {
  if (status === 200) {
    const len = headers["content-length"];
    return `the server ignores HTTP Range requests (it answered 200 with the whole file${len ? `, ${len} bytes` : ""}); a GeoTIFF over HTTP is read by byte ranges: use a server with Range support or download the file`;
  }
  return `HTTP ${status}${statusText ? ` ${statusText}` : ""} (a partial answer, 206, was expected)`;
}

function networkProblem(e: unknown): string {
  const err = e as { message?: string; cause?: { code?: string; message?: string } };
  const why = err?.cause?.code ?? err?.cause?.message ?? err?.message ?? String(e);
  return `cannot fetch (${String(why).split("\n")[0]})`;
}

function fmtSeconds(ms: number): string {
  return `${+(ms / 1000).toFixed(3)} s`;
}

function sleep(ms: number): Promise<void> {
  return new Promise((r) => setTimeout(r, ms));
}
