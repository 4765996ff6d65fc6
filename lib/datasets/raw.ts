import { createHash } from "node:crypto";
import { CHUNK_BYTES } from "./limits";

/**
 * Keeps the raw upload as it streams in, packed into fixed-size buffers (the rows of dataset_chunks), with its
 * SHA-256; copying each piece once into its final chunk keeps peak memory near the file size.
 */
export class RawCollector {
  readonly chunks: Buffer[] = [];
  bytes = 0;
  private current: Buffer | null = null;
  private used = 0;
  private readonly hash = createHash("sha256");

  constructor(private readonly chunkBytes = CHUNK_BYTES) {}

  push(piece: Uint8Array) {
    this.hash.update(piece);
    this.bytes += piece.byteLength;
    let at = 0;
    while (at < piece.byteLength) {
      if (!this.current || this.used === this.chunkBytes) {
        if (this.current) this.chunks.push(this.current);
        this.current = Buffer.allocUnsafe(this.chunkBytes);
        this.used = 0;
      }
      const n = Math.min(this.chunkBytes - this.used, piece.byteLength - at);
      this.current.set(piece.subarray(at, at + n), this.used);
      this.used += n;
      at += n;
    }
  }

  /** Ends the collection: the chunks in order (the last one trimmed) and the hex digest. */
  finish(): { chunks: Buffer[]; bytes: number; sha256: string } {
    if (this.current && this.used > 0) this.chunks.push(this.current.subarray(0, this.used));
    this.current = null;
    return { chunks: this.chunks, bytes: this.bytes, sha256: this.hash.digest("hex") };
  }
}
