import { CHUNK_BYTES } from "./limits";

const LE = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

/** Float64 values as little-endian byte chunks of at most `chunkBytes` (a multiple of 8). */
export function encodeFloat64(values: Float64Array, chunkBytes = CHUNK_BYTES): Buffer[] {
  const bytes = Buffer.alloc(values.length * 8);
  if (LE) Buffer.from(values.buffer, values.byteOffset, values.byteLength).copy(bytes);
  else for (let i = 0; i < values.length; i++) bytes.writeDoubleLE(values[i], i * 8);
  return splitChunks(bytes, chunkBytes - (chunkBytes % 8));
}

/** The inverse of encodeFloat64: chunks in order back to one Float64Array. */
export function decodeFloat64(chunks: Uint8Array[]): Float64Array {
  const total = chunks.reduce((s, c) => s + c.byteLength, 0);
  if (total % 8 !== 0) throw new RangeError(`decodeFloat64: ${total} bytes is not a whole number of doubles`);
  const out = new Float64Array(total / 8);
  const view = new Uint8Array(out.buffer);
  let at = 0;
  for (const c of chunks) {
    view.set(c, at);
    at += c.byteLength;
  }
  if (!LE) {
    const dv = new DataView(out.buffer);
    for (let i = 0; i < out.length; i++) out[i] = dv.getFloat64(i * 8, true);
  }
  return out;
}

/** Views of consecutive slices of at most `size` bytes (no copy). */
export function splitChunks(buf: Buffer, size = CHUNK_BYTES): Buffer[] {
  const out: Buffer[] = [];
  for (let at = 0; at < buf.length; at += size) out.push(buf.subarray(at, Math.min(buf.length, at + size)));
  return out;
}
