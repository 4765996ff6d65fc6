import { once } from "node:events";
import { CsvError, parse as csvParse } from "csv-parse";
import { DatasetParseError, showCell } from "./errors";
import { MAX_VALUES, SNIFF_BYTES } from "./limits";
import { isWhole, numberHint, parseCell } from "./numbers";
import { DELIMITER_NAMES, resolveColumn, sniff, type DatasetFormat, type SniffOptions } from "./sniff";

export interface ParseOptions extends SniffOptions {
  /** the values' column: a header name or a 1-based number; optional when there is one numeric column */
  column?: string;
  /** an optional weights or counts column (a frequency table) */
  weights?: string;
  /** "fail" (default): any bad cell fails the upload; "skip": rows with a bad cell are left out and counted */
  onInvalid?: "fail" | "skip";
  maxValues?: number;
}

export type SkipReason = "empty" | "non_numeric" | "field_count" | "empty_weight" | "non_numeric_weight" | "negative_weight";

/** Completes "N rows ..." for each reason. */
export const SKIP_REASON_TEXT: Record<SkipReason, string> = {
  empty: "with an empty value cell",
  non_numeric: "whose value is not a number",
  field_count: "with the wrong number of fields",
  empty_weight: "with an empty weight cell",
  non_numeric_weight: "whose weight is not a number",
  negative_weight: "with a negative weight",
};

export interface ParseProgress {
  /** data rows read so far */
  rows: number;
}

export interface ParsedDataset {
  format: DatasetFormat;
  delimiter: string | null;
  header: string[] | null;
  valueColumn: { index: number; name: string };
  weightColumn: { index: number; name: string } | null;
  values: Float64Array;
  /** null without a weights column */
  weights: Float64Array | null;
  /** "counts" when every weight is a whole number (a frequency table), else "weights" */
  weightKind: "none" | "counts" | "weights";
  /** data rows read (kept + skipped), blank lines not included */
  dataRows: number;
  skipped: { total: number; byReason: Partial<Record<SkipReason, number>>; first: BadCell | null };
  blankLines: number;
  /** sentences for the person who uploaded: what was guessed, what was left out */
  notes: string[];
}

interface BadCell {
  line: number;
  column: number;
  columnName: string;
  value: string;
  reason: SkipReason;
}

const plural = (n: number, one: string, many = `${one}s`) => `${n.toLocaleString("en")} ${n === 1 ? one : many}`;

function looksBinary(head: Buffer): boolean {
  if (head.length >= 4 && head[0] === 0x50 && head[1] === 0x4b && head[2] === 0x03 && head[3] === 0x04) return true; // zip (xlsx, ods)
  if (head.length >= 4 && head[0] === 0xd0 && head[1] === 0xcf && head[2] === 0x11 && head[3] === 0xe0) return true; // OLE (xls)
  return head.subarray(0, 8192).includes(0);
}

/** A growable Float64Array that never holds more than `max` values. */
class Column {
  data = new Float64Array(4096);
  length = 0;
  push(v: number) {
    if (this.length === this.data.length) {
      const next = new Float64Array(this.data.length * 2);
      next.set(this.data);
      this.data = next;
    }
    this.data[this.length++] = v;
  }
  /** A right-sized copy, so the growth slack is freed. */
  take(): Float64Array {
    return this.data.slice(0, this.length);
  }
}

function badMessage(first: BadCell, byReason: Partial<Record<SkipReason, number>>, total: number): string {
  const where = `Line ${first.line}, column ${first.column} (${showCell(first.columnName)})`;
  let what: string;
  switch (first.reason) {
    case "empty":
    case "empty_weight":
      what = "is empty";
      break;
    case "negative_weight":
      what = `holds ${showCell(first.value)}, a negative weight`;
      break;
    case "field_count":
      what = `is missing: the row has ${first.column - 1} field${first.column === 2 ? "" : "s"}`;
      break;
    default: {
      const hint = numberHint(first.value);
      what = `holds ${showCell(first.value)}, which is not a number${hint ? ` (${hint})` : ""}`;
    }
  }
  const parts = (Object.entries(byReason) as [SkipReason, number][]).map(([r, n]) => `${plural(n, "row")} ${SKIP_REASON_TEXT[r]}`);
  return `${where} ${what}. In all, ${plural(total, "row")} cannot be read: ${parts.join(", ")}. Fix the file, or choose to skip such rows.`;
}

/**
 * Streams a CSV, TSV or plain-list file through csv-parse, keeping one numeric column (and optionally a
 * weights/counts column) as Float64Array. Blank lines are ignored; bad cells fail the parse with the line and
 * column of the first one (or are skipped and counted with onInvalid "skip"). Memory: the kept values only.
 */
export async function parseDataset(
  source: AsyncIterable<Uint8Array>,
  opts: ParseOptions = {},
  onProgress?: (p: ParseProgress) => void,
): Promise<ParsedDataset> {
  const maxValues = opts.maxValues ?? MAX_VALUES;
  const iterator = source[Symbol.asyncIterator]();
  // Read the head for sniffing; the rest is streamed after it.
  const head: Buffer[] = [];
  let headBytes = 0;
  let done = false;
  while (headBytes < SNIFF_BYTES) {
    const r = await iterator.next();
    if (r.done) {
      done = true;
      break;
    }
    const b = Buffer.from(r.value.buffer, r.value.byteOffset, r.value.byteLength);
    head.push(b);
    headBytes += b.length;
  }
  const headBuf = Buffer.concat(head);
  if (headBuf.length === 0) throw new DatasetParseError("empty", "The file is empty (0 bytes).");
  if (looksBinary(headBuf)) {
    throw new DatasetParseError("binary", "This is not a text file (it looks like a spreadsheet or another binary format). Export it as CSV, TSV or a plain list of numbers, then upload that.");
  }
  const s = sniff(headBuf.toString("utf8"), done, opts);
  const vi = resolveColumn(s, opts.column, "values");
  const wi = opts.weights !== undefined && opts.weights.trim() !== "" ? resolveColumn(s, opts.weights, "weights") : -1;
  if (wi === vi) throw new DatasetParseError("column_ambiguous", `The values and the weights cannot be the same column (${showCell(s.columns[vi])}).`);
  const expected = s.header ? s.columns.length : null;

  const parser = csvParse({
    // A plain list has one field per line: NUL never occurs in a text file, so lines are never split.
    delimiter: s.delimiter ?? "\u0000",
    relax_column_count: true,
    skip_empty_lines: false,
    // No `info`: its per-record object triples the parse time; lines are counted below instead.
    bom: true,
  });
  let stop = false;
  const feed = (async () => {
    try {
      for (const b of head) if (!parser.write(b)) await once(parser, "drain");
      while (!done && !stop) {
        const r = await iterator.next();
        if (r.done || stop || parser.destroyed) break;
        if (!parser.write(Buffer.from(r.value.buffer, r.value.byteOffset, r.value.byteLength))) await once(parser, "drain");
      }
      if (!parser.destroyed) parser.end();
    } catch (e) {
      if (!parser.destroyed) parser.destroy(e as Error);
    }
  })();

  const values = new Column();
  const weights = wi >= 0 ? new Column() : null;
  let allWhole = true;
  let dataRows = 0;
  let blankLines = 0;
  let headerSeen = !s.header;
  let width: number | null = expected;
  const byReason: Partial<Record<SkipReason, number>> = {};
  let skippedTotal = 0;
  const st: { first: BadCell | null } = { first: null };
  const bad = (line: number, column: number, value: string, reason: SkipReason) => {
    byReason[reason] = (byReason[reason] ?? 0) + 1;
    skippedTotal++;
    if (!st.first) st.first = { line, column: column + 1, columnName: s.columns[column] ?? `column ${column + 1}`, value, reason };
  };

  // Line where the next record starts: one line per record plus the newlines inside quoted fields.
  let nextLine = 1;
  const onRecord = (record: string[]) => {
    const line = nextLine;
    let extra = 0;
    for (let f = 0; f < record.length; f++) {
      const cell = record[f];
      if (cell.length > 0 && cell.includes("\n")) extra += cell.split("\n").length - 1;
    }
    nextLine = line + 1 + extra;
    if (record.length === 1 && record[0].trim() === "") {
      blankLines++;
      return;
    }
    if (!headerSeen) {
      headerSeen = true;
      return;
    }
    dataRows++;
    if (width === null) width = record.length;
    if (record.length !== width && s.delimiter !== null) {
      if (opts.onInvalid !== "skip" && record.length > width) {
        // More fields than the header: the delimiter is the likely culprit, so stop here and say so.
        throw new DatasetParseError(
          "wrong_delimiter",
          `Line ${line} has ${record.length} fields where the ${s.header ? "header" : "first line"} has ${width}. The delimiter ${s.guessed ? "guessed from the first lines" : "chosen"} (${DELIMITER_NAMES[s.delimiter] ?? s.delimiter}) may be wrong, or a value contains an unquoted ${JSON.stringify(s.delimiter)}. Choose the delimiter, or quote such values.`,
          { line, column: width + 1 },
        );
      }
      bad(line, Math.min(record.length, Math.max(vi, wi)), "", "field_count");
      return;
    }
    const cell = record[vi] ?? "";
    const v = parseCell(cell, s.decimal);
    if (v === null) {
      bad(line, vi, cell, cell.trim() === "" ? "empty" : "non_numeric");
      return;
    }
    let w = 1;
    if (weights) {
      const wc = record[wi] ?? "";
      const parsed = parseCell(wc, s.decimal);
      if (parsed === null) {
        bad(line, wi, wc, wc.trim() === "" ? "empty_weight" : "non_numeric_weight");
        return;
      }
      if (parsed < 0) {
        bad(line, wi, wc, "negative_weight");
        return;
      }
      w = parsed;
    }
    if (values.length >= maxValues) {
      throw new DatasetParseError("too_many_values", `The file holds more than ${maxValues.toLocaleString("en")} values (line ${line} is one too many). Split it, or aggregate it into a frequency table with a counts column.`, { line });
    }
    values.push(v);
    if (weights) {
      weights.push(w);
      if (allWhole && !isWhole(w)) allWhole = false;
    }
    if (onProgress && (dataRows & 0x3ff) === 0) onProgress({ rows: dataRows });
  };

  try {
    await new Promise<void>((resolve, reject) => {
      parser.on("data", (record: string[]) => {
        if (stop) return;
        try {
          onRecord(record);
        } catch (e) {
          stop = true;
          reject(e);
        }
      });
      parser.on("end", resolve);
      parser.on("error", reject);
      parser.on("close", resolve);
    });
  } catch (e) {
    stop = true;
    if (!parser.destroyed) parser.destroy();
    await feed;
    if (e instanceof DatasetParseError) throw e;
    const err = e as Error & { code?: string; lines?: number; records?: number; column?: number | string; field?: string };
    // csv-parse names most codes CSV_*, a few without the prefix (INVALID_OPENING_QUOTE): compare without it.
    const code = typeof err.code === "string" ? err.code.replace(/^CSV_/, "") : "";
    if (code === "INVALID_OPENING_QUOTE" || code === "INVALID_CLOSING_QUOTE" || code === "NON_TRIMABLE_CHAR_AFTER_CLOSING_QUOTE") {
      const at = typeof err.lines === "number" && err.lines > 0 ? err.lines : nextLine;
      const col = typeof err.column === "number" ? err.column + 1 : undefined;
      const where = col !== undefined && s.delimiter !== null ? `line ${at}, column ${col}` : `line ${at}`;
      throw new DatasetParseError(
        "stray_quote",
        `A double quote on ${where} sits inside a value${err.field ? ` (after ${showCell(String(err.field))})` : ""}. Quote the whole value ("12.5"), double a quote meant literally (""), or remove it.`,
        { line: at, ...(col !== undefined ? { column: col } : {}) },
      );
    }
    if (code === "QUOTE_NOT_CLOSED") {
      // Records still buffered when the parser fails are dropped; its own count says how far it got.
      const at = Math.max(nextLine, (err.records ?? 0) + 1);
      throw new DatasetParseError("unclosed_quote", `A double quote opened on line ${at} is never closed, so the rest of the file reads as one value. Close or remove that quote.`, { line: at });
    }
    if (e instanceof CsvError) {
      throw new DatasetParseError("field_count", `Line ${nextLine} cannot be read as ${s.format.toUpperCase()}: ${err.message.replace(/^[^:]*:\s*/, "")}`, { line: nextLine });
    }
    throw e;
  }
  await feed;

  const first = st.first;
  if (values.length === 0) {
    if (first) throw new DatasetParseError("bad_values", badMessage(first, byReason, skippedTotal).replace(/, or choose to skip such rows\.$/, ": no row holds a usable value."), detailOf(first, byReason));
    if (s.header && dataRows === 0) throw new DatasetParseError("no_data", `The file has a header row (${s.columns.map(showCell).join(", ")}) but no data rows.`, { line: 2 });
    throw new DatasetParseError("empty", "The file is empty: it holds no lines with values.");
  }
  if (first && opts.onInvalid !== "skip") throw new DatasetParseError("bad_values", badMessage(first, byReason, skippedTotal), detailOf(first, byReason));

  let weightKind: ParsedDataset["weightKind"] = "none";
  let w: Float64Array | null = null;
  if (weights) {
    w = weights.take();
    let total = 0;
    for (let i = 0; i < w.length; i++) total += w[i];
    if (!(total > 0)) throw new DatasetParseError("weights", `Every weight in column ${showCell(s.columns[wi])} is zero; at least one must be positive.`, { column: wi + 1 });
    weightKind = allWhole ? "counts" : "weights";
  }
  const notes: string[] = [];
  if (s.guessed) notes.push(s.delimiter === null ? "Read as a plain list (one number per line)." : `Read as ${s.format.toUpperCase()} separated by ${DELIMITER_NAMES[s.delimiter] ?? JSON.stringify(s.delimiter)}.`);
  if (s.header) notes.push(`Header row found; values from column ${showCell(s.columns[vi])}${wi >= 0 ? `, ${weightKind === "counts" ? "counts" : "weights"} from ${showCell(s.columns[wi])}` : ""}.`);
  if (skippedTotal > 0 && first) {
    const f = first;
    notes.push(
      `${plural(skippedTotal, "row")} skipped: ${(Object.entries(byReason) as [SkipReason, number][]).map(([r, n]) => `${n.toLocaleString("en")} ${SKIP_REASON_TEXT[r]}`).join(", ")} (first on line ${f.line}, column ${f.column}).`,
    );
  }
  if (s.decimal === "comma") notes.push(`Numbers read with a decimal comma (12,5 is 12.5)${s.decimalGuessed ? ", as the file writes them" : ""}.`);
  if ((opts.column === undefined || opts.column.trim() === "") && s.columns.length > 1) notes.push(`No values column was chosen: the first column holding numbers (${showCell(s.columns[vi])}) was used.`);
  if (blankLines > 0) notes.push(`${plural(blankLines, "blank line")} ignored.`);
  return {
    format: s.format,
    delimiter: s.delimiter,
    header: s.header ? s.columns : null,
    valueColumn: { index: vi, name: s.columns[vi] },
    weightColumn: wi >= 0 ? { index: wi, name: s.columns[wi] } : null,
    values: values.take(),
    weights: w,
    weightKind,
    dataRows,
    skipped: { total: skippedTotal, byReason, first },
    blankLines,
    notes,
  };
}

function detailOf(first: BadCell, byReason: Partial<Record<SkipReason, number>>) {
  return { line: first.line, column: first.column, value: first.value.slice(0, 40), counts: byReason as Record<string, number> };
}
