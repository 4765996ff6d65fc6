import "server-only";
import type { NewVersionData } from "@/lib/db/datasets";
import { DatasetParseError } from "./errors";
import { MAX_UPLOAD_BYTES } from "./limits";
import { parseDataset } from "./parse";
import { isZip, workbookToTsv } from "./xlsx";
import { setProgress } from "./progress";
import { RawCollector } from "./raw";
import type { UploadQuery } from "./schemas";
import { histogram, summarize } from "./stats";

const mib = (n: number) => `${(n / 1024 / 1024).toFixed(n < 1024 * 1024 ? 2 : 1)} MiB`;

/** Reads a web stream, keeping each piece in the raw collector and stopping at the size limit. */
async function* tee(body: ReadableStream<Uint8Array>, raw: RawCollector, maxBytes: number, onBytes: (n: number) => void): AsyncGenerator<Uint8Array> {
  const reader = body.getReader();
  try {
    for (;;) {
      const { done, value } = await reader.read();
      if (done) return;
      if (raw.bytes + value.byteLength > maxBytes) {
        throw new DatasetParseError("too_large", `The file is larger than ${mib(maxBytes)}, the upload limit. Split it, or aggregate it into a frequency table with a counts column.`);
      }
      raw.push(value);
      onBytes(raw.bytes);
      yield value;
    }
  } finally {
    reader.releaseLock();
  }
}

async function drain(body: ReadableStream<Uint8Array>, budget: number) {
  if (body.locked) return;
  const reader = body.getReader();
  try {
    let left = budget;
    while (left > 0) {
      const { done, value } = await reader.read();
      if (done) return;
      left -= value.byteLength;
    }
    await reader.cancel();
  } catch {
    /* the client went away: nothing to answer */
  } finally {
    reader.releaseLock();
  }
}

/**
 * Streams an upload body through the parser, keeping the raw file alongside, and returns everything a new
 * version stores. Throws DatasetParseError for anything a person can fix in the file or the form; nothing
 * is written here, so a failure leaves no trace in the database.
 */
export async function receiveDatasetUpload(args: {
  body: ReadableStream<Uint8Array> | null;
  contentLength: number | null;
  query: UploadQuery;
  userId: number;
  maxBytes?: number;
}): Promise<NewVersionData> {
  const maxBytes = args.maxBytes ?? MAX_UPLOAD_BYTES;
  const { query, userId } = args;
  if (args.contentLength !== null && args.contentLength > maxBytes) {
    throw new DatasetParseError("too_large", `The file is ${mib(args.contentLength)}; the upload limit is ${mib(maxBytes)}. Split it, or aggregate it into a frequency table with a counts column.`);
  }
  if (!args.body) throw new DatasetParseError("empty", "The file is empty (0 bytes).");
  const raw = new RawCollector();
  let rows = 0;
  const report = (phase: "receiving" | "storing" | "failed") =>
    setProgress(query.uploadId, { userId, phase, bytesRead: raw.bytes, totalBytes: args.contentLength, rows });
  let last = 0;
  report("receiving");
  const source = tee(args.body, raw, maxBytes, (n) => {
    if (n - last >= 256 * 1024) {
      last = n;
      report("receiving");
    }
  });
  try {
    const excel = query.format === "xlsx" || /\.xlsx$/i.test(query.fileName ?? "");
    let input: AsyncIterable<Uint8Array> = source;
    let sheetNote: string | null = null;
    if (excel) {
      // A workbook is a zip: read it whole (within its own cap), then parse its sheet as tab-separated text.
      const parts: Uint8Array[] = [];
      for await (const piece of source) parts.push(piece);
      const file = Buffer.concat(parts);
      if (!isZip(file)) throw new DatasetParseError("binary", "This file is not an Excel workbook (.xlsx). Choose the format that matches it, or let it be detected.");
      const sheet = workbookToTsv(file, query.sheet);
      sheetNote = `Read from the sheet ${JSON.stringify(sheet.sheet)} of the workbook${sheet.sheets.length > 1 ? ` (it has ${sheet.sheets.length} sheets)` : ""}.`;
      input = (async function* () {
        yield Buffer.from(sheet.text, "utf8");
      })();
    }
    const parsed = await parseDataset(
      input,
      { format: excel ? "tsv" : query.format === "xlsx" ? "auto" : query.format, delimiter: excel ? undefined : query.delimiter, header: query.header, decimal: excel ? "dot" : query.decimal, column: query.column, weights: query.weights, onInvalid: query.onInvalid },
      (p) => {
        rows = p.rows;
      },
    );
    if (sheetNote) parsed.notes.unshift(sheetNote);
    rows = parsed.dataRows;
    const kind = parsed.weightKind === "weights" ? "weights" : "counts";
    const summary = summarize(parsed.values, parsed.weights, kind);
    const hist = histogram(parsed.values, parsed.weights);
    const file = raw.finish();
    report("storing");
    return {
      fileName: query.fileName || "upload",
      raw: file,
      format: excel ? "xlsx" : parsed.format,
      delimiter: excel ? null : parsed.delimiter,
      valueColumn: parsed.header ? parsed.valueColumn.name : String(parsed.valueColumn.index + 1),
      weightColumn: parsed.weightColumn ? (parsed.header ? parsed.weightColumn.name : String(parsed.weightColumn.index + 1)) : null,
      weightKind: parsed.weightKind,
      values: parsed.values,
      weights: parsed.weights,
      skippedRows: parsed.skipped.total,
      summary,
      histogram: hist,
      notes: parsed.notes,
    };
  } catch (e) {
    report("failed");
    await source.return(undefined);
    // Read and drop the rest (up to the limit), so the browser sees our answer rather than a reset connection.
    if (!(e instanceof DatasetParseError && e.code === "too_large")) await drain(args.body, maxBytes - raw.bytes);
    throw e;
  }
}
