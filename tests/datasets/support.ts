// Shared helpers of the dataset tests: files as chunked streams, and a table-driven failure printer.
import { parseDataset, type ParseOptions } from "@/lib/datasets/parse";
import { DatasetParseError } from "@/lib/datasets/errors";

/** The text as a stream of `chunk`-byte pieces, so chunk boundaries fall inside rows and numbers. */
export async function* chunks(text: string | Buffer, chunk = 7): AsyncGenerator<Uint8Array> {
  const b = typeof text === "string" ? Buffer.from(text, "utf8") : text;
  for (let i = 0; i < b.length; i += chunk) yield b.subarray(i, Math.min(b.length, i + chunk));
}

export const parseText = (text: string | Buffer, opts: ParseOptions = {}, chunk = 7) => parseDataset(chunks(text, chunk), opts);

/** The DatasetParseError a parse throws (fails the test when it resolves or throws something else). */
export async function parseError(text: string | Buffer, opts: ParseOptions = {}): Promise<DatasetParseError> {
  try {
    const r = await parseText(text, opts);
    throw new Error(`expected a DatasetParseError, got ${r.values.length} values`);
  } catch (e) {
    if (e instanceof DatasetParseError) return e;
    throw e;
  }
}

/** Relative difference check that prints inputs, value, expected, difference and tolerance on failure. */
export function near(label: string, value: number | null, expected: number, tol: number) {
  const diff = value === null ? Infinity : Math.abs(value - expected);
  const scale = Math.max(1, Math.abs(expected));
  if (!(diff <= tol * scale)) {
    throw new Error(`${label}: value ${value}, expected ${expected}, difference ${diff}, tolerance ${tol} (relative, floor 1)`);
  }
}
