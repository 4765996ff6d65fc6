import { createHash } from "node:crypto";
import { describe, expect, it } from "vitest";
import { decodeFloat64, encodeFloat64, splitChunks } from "@/lib/datasets/codec";
import { RawCollector } from "@/lib/datasets/raw";

describe("Float64 chunks", () => {
  const cases: [string, Float64Array, number][] = [
    ["empty", new Float64Array(0), 1024],
    ["special values survive bit for bit", Float64Array.of(-0, 5e-324, Number.MAX_VALUE, -Number.MIN_VALUE, Math.PI, 1e-310), 16],
    ["several chunks with a short last one", Float64Array.from({ length: 1001 }, (_, i) => i / 7), 800],
    ["chunk size not a multiple of 8 is rounded down", Float64Array.from({ length: 10 }, (_, i) => -i), 20],
  ];
  for (const [name, values, size] of cases) {
    it(name, () => {
      const chunks = encodeFloat64(values, size);
      for (const c of chunks) expect(c.length % 8, `${name}: chunk of ${c.length} bytes`).toBe(0);
      expect(chunks.every((c) => c.length <= size)).toBe(true);
      const back = decodeFloat64(chunks);
      expect(Buffer.from(back.buffer).equals(Buffer.from(values.buffer, values.byteOffset, values.byteLength)), name).toBe(true);
    });
  }
  it("refuses a byte count that is not whole doubles", () => {
    expect(() => decodeFloat64([new Uint8Array(12)])).toThrow(/12 bytes/);
  });
  it("splitChunks covers the buffer exactly", () => {
    const b = Buffer.from("abcdefghij");
    expect(splitChunks(b, 4).map((c) => c.toString())).toEqual(["abcd", "efgh", "ij"]);
    expect(splitChunks(Buffer.alloc(0), 4)).toEqual([]);
  });
});

describe("RawCollector", () => {
  it("packs pieces of any size into fixed chunks, byte for byte, with the SHA-256 (node:crypto)", () => {
    const text = Buffer.from("claim,amount\n".repeat(1000));
    const raw = new RawCollector(1000);
    for (let i = 0; i < text.length; i += 333) raw.push(text.subarray(i, i + 333));
    const r = raw.finish();
    expect(r.bytes).toBe(text.length);
    expect(r.chunks.slice(0, -1).every((c) => c.length === 1000)).toBe(true);
    expect(Buffer.concat(r.chunks).equals(text)).toBe(true);
    expect(r.sha256).toBe(createHash("sha256").update(text).digest("hex"));
  });
  it("an empty upload has no chunks", () => {
    expect(new RawCollector(8).finish()).toMatchObject({ chunks: [], bytes: 0, sha256: createHash("sha256").digest("hex") });
  });
});
