// Plain decimal or scientific notation with a dot: what spreadsheets and programs export when asked for CSV.
const NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
// The same with a decimal comma ("12,5"), as spreadsheets in much of Europe write numbers (with ";" between fields).
const NUMBER_COMMA = /^[+-]?(?:\d+,?\d*|,\d+)(?:[eE][+-]?\d+)?$/;

export type DecimalMark = "dot" | "comma";

/**
 * The finite number a cell holds, or null. Surrounding spaces are ignored; "NaN", "Inf", "0x1f" are not numbers.
 * With the decimal comma, "12,5" is 12.5 and a dot is not accepted (it would be a thousands separator).
 */
export function parseCell(cell: string, decimal: DecimalMark = "dot"): number | null {
  const s = cell.trim();
  if (decimal === "comma") {
    if (!NUMBER_COMMA.test(s)) return null;
    const v = Number(s.replace(",", "."));
    return Number.isFinite(v) ? v : null;
  }
  if (!NUMBER.test(s)) return null;
  const v = Number(s);
  return Number.isFinite(v) ? v : null;
}

/** True when a cell is a number written with a decimal comma and not also a plain number ("12,5" but not "12"). */
export const hasDecimalComma = (cell: string) => /^[+-]?\d*,\d+(?:[eE][+-]?\d+)?$/.test(cell.trim());

/** Why a non-empty cell is not a number, in words a person can act on (null when no specific hint applies). */
export function numberHint(cell: string): string | null {
  const s = cell.trim();
  if (NUMBER.test(s)) return "it overflows a double-precision number";
  if (/^[+-]?\d{1,3}(?:[ ,.'\u00a0\u202f]\d{3})+(?:[.,]\d+)?$/.test(s)) return "it seems to use a thousands separator; remove it";
  if (/^[+-]?\d*,\d+(?:[eE][+-]?\d+)?$/.test(s)) return "it seems to use a decimal comma; choose the decimal comma in the upload options";
  if (/^[+-]?(?:nan|inf|infinity)$/i.test(s)) return "only finite numbers are accepted";
  if (/^[-+]?[$€£¥]|[$€£¥%]$/.test(s)) return "remove the currency or percent sign";
  return null;
}

/** True when v is a whole number (counts of a frequency table). */
export const isWhole = (v: number) => Number.isInteger(v);
