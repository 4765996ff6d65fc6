// Uploads in the formats people have: semicolon-separated files with decimal commas, the first numeric column
// by default (identifiers passed over), errors that name the column read, and Excel workbooks (.xlsx).
import * as XLSX from "@e965/xlsx";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { parseCell } from "@/lib/datasets/numbers";
import { cookieFor, makeTeam } from "../portal/support";
import { datasetServer, upload } from "./db-support";
import { parseError, parseText } from "./support";

// Invented demo data: Harrowgate Mutual's storm claims as a spreadsheet in a decimal-comma locale exports them.
const SEMI = "claim_id;region;amount_eur;settled\nHM-1;north;1234,5;2025-03-01\nHM-2;south;99,25;2025-03-04\nHM-3;north;12;2025-03-09\n";

describe("decimal comma and delimiters", () => {
  it("parseCell reads 12,5 as 12.5 with the decimal comma, and refuses a dot then (a thousands separator)", () => {
    expect(parseCell("12,5", "comma")).toBe(12.5);
    expect(parseCell("-0,125e2", "comma")).toBe(-12.5);
    expect(parseCell("1.234,5", "comma")).toBeNull();
    expect(parseCell("12,5")).toBeNull();
  });

  it("a semicolon file with decimal commas is read without options, from the first numeric column", async () => {
    const r = await parseText(SEMI);
    expect(r.delimiter).toBe(";");
    expect(r.valueColumn.name).toBe("amount_eur");
    expect(Array.from(r.values)).toEqual([1234.5, 99.25, 12]);
    expect(r.notes.join(" ")).toMatch(/decimal comma/);
  });

  it("the options say it outright: delimiter and decimal mark chosen", async () => {
    const r = await parseText(SEMI, { format: "csv", delimiter: ";", decimal: "comma", column: "amount_eur" });
    expect(Array.from(r.values)).toEqual([1234.5, 99.25, 12]);
  });

  it("a numeric identifier column is passed over for the first measurement column", async () => {
    const r = await parseText("policy_no,sum_insured,claims\n100231,250000,0\n100232,180000,2\n100233,320000,1\n");
    expect(r.valueColumn.name).toBe("sum_insured");
  });

  it("a bad value names the column read (the chosen one), with its line", async () => {
    const e = await parseError("claim_id,amount\nC1,12.5\nC2,n/a\n", { column: "amount" });
    expect(e.message).toMatch(/^Line 3, column 2 \("amount"\)/);
    const dot = await parseError(SEMI, { decimal: "dot", column: "amount_eur" });
    expect(dot.message).toMatch(/column 3 .*amount_eur.*decimal comma/);
  });
});

function workbook(rows: unknown[][], sheets: Record<string, unknown[][]> = {}): Buffer {
  const wb = XLSX.utils.book_new();
  XLSX.utils.book_append_sheet(wb, XLSX.utils.aoa_to_sheet(rows), "Claims");
  for (const [name, r] of Object.entries(sheets)) XLSX.utils.book_append_sheet(wb, XLSX.utils.aoa_to_sheet(r), name);
  return XLSX.write(wb, { type: "buffer", bookType: "xlsx" }) as Buffer;
}

describe("Excel workbooks", () => {
  const server = datasetServer();
  let T: Awaited<ReturnType<typeof makeTeam>>;
  let dev: string;
  beforeAll(async () => {
    T = await makeTeam("Harrowgate Mutual");
    dev = await cookieFor(T.developer.id);
  });
  afterAll(() => new Promise<void>((r) => server.close(() => r())));

  it("stores the first sheet's first numeric column, numbers as stored (not as formatted)", async () => {
    const file = workbook([["claim_id", "amount_eur"], ["HM-1", 1234.5], ["HM-2", 99.25], ["HM-3", 1e6 / 3]]);
    const res = await upload(server, dev, file, { name: "Storm claims (Excel)", fileName: "storm.xlsx" });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.version.format).toBe("xlsx");
    expect(res.body.version.rows).toBe(3);
    expect(res.body.version.valueColumn).toBe("amount_eur");
    // mean of the three values, as stored in the workbook (full double precision)
    expect(Math.abs(res.body.version.summary.mean - (1234.5 + 99.25 + 1e6 / 3) / 3)).toBeLessThan(1e-9);
    expect(res.body.version.notes.join(" ")).toMatch(/sheet "Claims"/);
  });

  it("reads a named sheet, and names the sheets when the one asked for is missing; nothing is stored", async () => {
    const file = workbook([["note"], ["see the other sheet"]], { Counts: [["claims", "policies"], [0, 812], [1, 143], [2, 38]] });
    const ok = await upload(server, dev, file, { name: "Claim counts", fileName: "counts.xlsx", sheet: "counts", column: "claims", weights: "policies" });
    expect(ok.status, JSON.stringify(ok.body)).toBe(201);
    expect(ok.body.version.weightKind).toBe("counts");
    const missing = await upload(server, dev, file, { name: "Nope", fileName: "counts.xlsx", sheet: "Totals" });
    expect(missing.status).toBe(422);
    expect(missing.body.error).toMatch(/no sheet .*Totals.*sheets are .*Claims.*Counts/);
    const listed = await request(server).get("/api/portal/datasets").set("cookie", dev);
    expect(listed.body.datasets.map((d: { name: string }) => d.name)).not.toContain("Nope");
  });

  it("a file named .xlsx that is not a workbook is refused with a readable message", async () => {
    const res = await upload(server, dev, "1\n2\n", { name: "Fake", fileName: "fake.xlsx" });
    expect(res.status).toBe(422);
    expect(res.body.error).toMatch(/not an Excel workbook/);
  });
});
