/**
 * The chunk option for a block of `bytes` inflated bytes: one more than the block, so zlib
 * finishes with room to spare and allocates no second chunk (nothing below zlib's 64-byte
 * minimum, nothing for an unknown or implausible size).
 * @example blockChunk(256 * 256 * 4) // { chunkSize: 262145 }
 */
export function blockChunk(bytes: number): { chunkSize?: number } {
  return Number.isFinite(bytes) && bytes > 0 && bytes <= MAX_CHUNK_BYTES ? { chunkSize: Math.max(64, bytes + 1) } : {};
}

/** Larger blocks (whole strips of a huge raster) keep zlib's default chunks. */
const MAX_CHUNK_BYTES = 64 * 2 ** 20;
