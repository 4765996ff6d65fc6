import { DatasetParseError, showCell } from "./errors";
import { hasDecimalComma, numberHint, parseCell, type DecimalMark } from "./numbers";

// Pure and dependency-free so the portal page can run it on the file's first bytes before uploading.

export type DatasetFormat = "csv" | "tsv" | "list";

export interface SniffOptions {
  /** "auto" guesses from the first lines; "csv" means comma unless `delimiter` says otherwise */
  format?: "auto" | DatasetFormat;
  /** an explicit single-character delimiter for csv (";" or "|" files) */
  delimiter?: string;
  header?: "auto" | "yes" | "no";
  /** the decimal mark of the numbers; "auto" reads a decimal comma when the fields are not comma-separated and the numbers use one */
  decimal?: "auto" | DecimalMark;
}

export interface SniffResult {
  format: DatasetFormat;
  /** the field delimiter; a plain list has none (null) */
  delimiter: string | null;
  header: boolean;
  /** header cells, or "column 1", "column 2", ... */
  columns: string[];
  /** 0-based columns whose cells in the first data rows are all numbers (empty cells aside) */
  numericColumns: number[];
  /** the first rows as split, for a preview */
  rows: string[][];
  /** true when format or delimiter were guessed rather than chosen */
  guessed: boolean;
  decimal: DecimalMark;
  /** true when the decimal mark was guessed */
  decimalGuessed: boolean;
}

/** Delimiters tried, in order of preference when several split every line alike (";" before ",": decimal commas). */
export const CANDIDATES = ["\t", ";", ",", "|"] as const;
export const DELIMITER_NAMES: Record<string, string> = { "\t": "tab", ";": "semicolon", ",": "comma", "|": "vertical bar" };
const nameOf = (d: string) => `${DELIMITER_NAMES[d] ?? "delimiter"} (${JSON.stringify(d)})`;
const SNIFF_LINES = 50;
/** Header names of identifier columns, which hold numbers that are not measurements. */
const ID_HEADER = /(^|[\s_.-])(id|no|nr|number|num|code|key|ref|#)$|^id[\s_.-]|^#$/i;

/** Splits one line on `delim` honouring RFC 4180 double quotes ("" inside quotes is a quote). */
export function splitLine(line: string, delim: string): string[] {
  const out: string[] = [];
  let cur = "";
  let quoted = false;
  for (let i = 0; i < line.length; i++) {
    const c = line[i];
    if (quoted) {
      if (c === '"') {
        if (line[i + 1] === '"') (cur += '"'), i++;
        else quoted = false;
      } else cur += c;
    } else if (c === '"' && cur.trim() === "") {
      quoted = true;
      cur = "";
    } else if (c === delim) {
      out.push(cur.trim());
      cur = "";
    } else cur += c;
  }
  out.push(cur.trim());
  return out;
}

/** The first complete, non-blank lines of a text (the last line is dropped unless the text is the whole file). */
export function headLines(text: string, complete: boolean, max = SNIFF_LINES): string[] {
  const lines = text.replace(/^\uFEFF/, "").split(/\r\n|\n|\r/);
  if (!complete) lines.pop();
  return lines.filter((l) => l.trim() !== "").slice(0, max);
}

/** Fields per line for each candidate delimiter. */
function counts(lines: string[]) {
  return CANDIDATES.map((d) => ({ d, n: lines.map((l) => splitLine(l, d).length) }));
}

function guessDelimiter(lines: string[]): string | null {
  const c = counts(lines);
  const consistent = c.find((x) => x.n[0] >= 2 && x.n.every((n) => n === x.n[0]));
  if (consistent) return consistent.d;
  // No delimiter splits every line alike: take the one found on most lines; parsing then points at the odd line.
  const best = c.map((x) => ({ d: x.d, lines: x.n.filter((n) => n >= 2).length })).sort((a, b) => b.lines - a.lines)[0];
  return best.lines > lines.length / 2 ? best.d : null;
}

/**
 * Guesses (or checks the chosen) format, delimiter and header from the file's first lines. Throws
 * DatasetParseError("wrong_delimiter") when a chosen delimiter does not split the lines but another does.
 */
export function sniff(text: string, complete: boolean, opts: SniffOptions = {}): SniffResult {
  const lines = headLines(text, complete);
  if (lines.length === 0) throw new DatasetParseError("empty", "The file is empty: it holds no lines with values.");
  const format = opts.format ?? "auto";
  const guessed = format === "auto" && !opts.delimiter;
  let delimiter: string | null;
  if (opts.delimiter) delimiter = opts.delimiter;
  else if (format === "csv") delimiter = ",";
  else if (format === "tsv") delimiter = "\t";
  else if (format === "list") delimiter = null;
  else delimiter = guessDelimiter(lines);

  if (!guessed) {
    const other = guessDelimiter(lines);
    const chosenSplits = delimiter !== null && lines.some((l) => splitLine(l, delimiter!).length >= 2);
    if (delimiter !== null && !chosenSplits && other !== null) {
      throw new DatasetParseError(
        "wrong_delimiter",
        `You chose ${nameOf(delimiter)} as the delimiter, but no line of the file contains it; the lines are split by ${nameOf(other)}. Choose ${DELIMITER_NAMES[other] ?? "that delimiter"}, or let the format be detected.`,
        { line: 1 },
      );
    }
    if (delimiter === null && other !== null) {
      const n = splitLine(lines[0], other).length;
      throw new DatasetParseError(
        "wrong_delimiter",
        `You chose a plain list (one number per line), but the lines hold ${n} fields separated by ${nameOf(other)}. Choose CSV${other === "\t" ? "/TSV" : ""} and the column, or let the format be detected.`,
        { line: 1 },
      );
    }
  }

  const rows = lines.map((l) => (delimiter === null ? [l.trim()] : splitLine(l, delimiter)));
  // A decimal comma cannot be told from a field separator in a comma-separated file; elsewhere the numbers say.
  const cells = rows.flat();
  const decimalGuessed = (opts.decimal ?? "auto") === "auto";
  const decimal: DecimalMark = !decimalGuessed ? (opts.decimal as DecimalMark) : delimiter !== "," && cells.some(hasDecimalComma) && !cells.some((c) => /^[+-]?\d*\.\d+$/.test(c.trim())) ? "comma" : "dot";
  const first = rows[0];
  // A header cell is text; "1 200" or "12,5" are numbers written in another convention, not names.
  const looksLikeHeader = first.some((c) => c !== "" && parseCell(c, decimal) === null && numberHint(c) === null);
  const header = opts.header === "yes" ? true : opts.header === "no" ? false : looksLikeHeader;
  const width = Math.max(...rows.map((r) => r.length));
  const columns = header ? first.map((c, i) => c || `column ${i + 1}`) : Array.from({ length: width }, (_, i) => `column ${i + 1}`);
  const data = (header ? rows.slice(1) : rows).slice(0, 20);
  const numericColumns = columns
    .map((_, i) => i)
    .filter((i) => data.length > 0 && data.some((r) => (r[i] ?? "") !== "") && data.every((r) => (r[i] ?? "") === "" || parseCell(r[i], decimal) !== null));
  const fmt: DatasetFormat = delimiter === null ? "list" : delimiter === "\t" ? "tsv" : "csv";
  return { format: fmt, delimiter, header, columns, numericColumns, rows: rows.slice(0, 6), guessed, decimal, decimalGuessed };
}

/**
 * The 0-based column a choice names: a header name (case and surrounding spaces ignored) or a 1-based number.
 * With no choice, the only column or the only numeric column. `role` words the messages ("values", "weights").
 */
export function resolveColumn(s: SniffResult, choice: string | undefined, role: string): number {
  const list = s.columns.map((c) => showCell(c)).join(", ");
  if (choice === undefined || choice.trim() === "") {
    if (s.columns.length === 1) return 0;
    // The first column that holds numbers, passing over identifiers ("claim_id", "policy no") when another holds numbers.
    const ident = (i: number) => s.header && ID_HEADER.test(s.columns[i].trim());
    const measure = s.numericColumns.find((i) => !ident(i));
    if (measure !== undefined) return measure;
    if (s.numericColumns.length >= 1) return s.numericColumns[0];
    throw new DatasetParseError(
      "column_ambiguous",
      `The file has ${s.columns.length} columns (${list}) and none of them holds only numbers in its first rows${s.decimal === "dot" && s.rows.flat().some(hasDecimalComma) ? " (the numbers seem to use a decimal comma: choose it in the options)" : ""}; choose the column with the ${role}.`,
    );
  }
  const want = choice.trim().toLowerCase();
  const byName = s.header ? s.columns.findIndex((c) => c.trim().toLowerCase() === want) : -1;
  if (byName >= 0) return byName;
  if (/^\d+$/.test(want)) {
    const k = Number(want);
    if (k >= 1 && k <= s.columns.length) return k - 1;
  }
  // A header read as a single column that still contains a delimiter means the delimiter was wrong.
  if (s.columns.length === 1 && s.header) {
    const inside = CANDIDATES.find((d) => d !== s.delimiter && s.columns[0].includes(d));
    if (inside) {
      throw new DatasetParseError(
        "wrong_delimiter",
        `No column ${showCell(choice)}: the header reads as one column ${showCell(s.columns[0])}, so the file seems to be split by ${nameOf(inside)}${s.delimiter ? `, not ${nameOf(s.delimiter)}` : ""}. Choose ${DELIMITER_NAMES[inside]} as the delimiter.`,
        { line: 1 },
      );
    }
  }
  throw new DatasetParseError(
    "column_not_found",
    s.header
      ? `No column ${showCell(choice)} for the ${role}: the header has ${list}. Give a name from the header or a column number from 1 to ${s.columns.length}.`
      : `No column ${showCell(choice)} for the ${role}: the file has no header row and ${s.columns.length} column${s.columns.length === 1 ? "" : "s"}; give a column number from 1 to ${s.columns.length}.`,
    { line: 1 },
  );
}
