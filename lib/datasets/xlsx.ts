import "server-only";
import * as XLSX from "@e965/xlsx";
import { DatasetParseError, showCell } from "./errors";
import { MAX_VALUES } from "./limits";

/** Excel workbooks are read whole, so their own cap sits below the text upload limit (a zip inflates many-fold). */
export const MAX_XLSX_BYTES = 20 * 1024 * 1024;
const MAX_CELLS = 5_000_000;

/** A zip container (xlsx, ods) by its magic number. */
export const isZip = (head: Uint8Array) => head.length >= 4 && head[0] === 0x50 && head[1] === 0x4b && head[2] === 0x03 && head[3] === 0x04;

/**
 * One worksheet of an Excel workbook as tab-separated text, with the numbers as stored (never as formatted,
 * so "1,234.50" on screen reads as 1234.5) and formulas by their last computed value. Uses SheetJS
 * (the @e965/xlsx distribution of xlsx 0.20.3, which carries the fixes for CVE-2023-30533 and CVE-2024-22363).
 */
export function workbookToTsv(file: Buffer, sheet?: string): { text: string; sheet: string; sheets: string[] } {
  if (file.length > MAX_XLSX_BYTES) {
    throw new DatasetParseError("too_large", `The workbook is ${(file.length / 1048576).toFixed(1)} MiB; workbooks are read up to ${MAX_XLSX_BYTES / 1048576} MiB. Save the sheet as CSV and upload that.`);
  }
  let wb: XLSX.WorkBook;
  try {
    wb = XLSX.read(file, { type: "buffer", dense: true, cellFormula: false, cellHTML: false, cellStyles: false, cellDates: false, sheetRows: MAX_VALUES + 2 });
  } catch {
    throw new DatasetParseError("binary", "This file cannot be read as an Excel workbook (.xlsx). Save it again from the spreadsheet program, or export the sheet as CSV.");
  }
  const sheets = wb.SheetNames;
  const name = sheet ? sheets.find((s) => s.trim().toLowerCase() === sheet.trim().toLowerCase()) : sheets[0];
  if (!name) {
    throw new DatasetParseError("column_not_found", `The workbook has no sheet ${showCell(sheet ?? "")}; its sheets are ${sheets.map((s) => showCell(s)).join(", ")}.`);
  }
  const ws = wb.Sheets[name];
  const ref = ws["!ref"];
  if (!ref) throw new DatasetParseError("empty", `The sheet ${showCell(name)} is empty.`);
  const r = XLSX.utils.decode_range(ref);
  if ((r.e.r - r.s.r + 1) * (r.e.c - r.s.c + 1) > MAX_CELLS) {
    throw new DatasetParseError("too_many_values", `The sheet ${showCell(name)} spans more than ${MAX_CELLS.toLocaleString("en")} cells. Keep only the columns you need, or export them as CSV.`);
  }
  const text = XLSX.utils.sheet_to_csv(ws, { FS: "\t", RS: "\n", blankrows: false, rawNumbers: true, strip: true });
  return { text, sheet: name, sheets };
}
