import { describe, expect, it } from "vitest";
import { MAX_VALUES } from "@/lib/datasets/limits";
import { sniff } from "@/lib/datasets/sniff";
import { parseError, parseText } from "./support";

// Demo files: Harrowgate Mutual's claim sizes and Kestrel Fasteners' part deviations (invented figures).

describe("parseDataset: happy paths", () => {
  const cases: { name: string; text: string; opts?: Parameters<typeof parseText>[1]; values: number[]; weights?: number[]; kind?: string; format: string; column?: string }[] = [
    {
      name: "CSV with header, column chosen by name",
      text: "claim_id,loss,region\nH-1,1200.5,north\nH-2,830,south\nH-3,4e3,north\n",
      opts: { column: "loss" },
      values: [1200.5, 830, 4000],
      format: "csv",
      column: "loss",
    },
    {
      name: "CSV with header, column chosen by number, CRLF and quoted cells",
      text: 'claim_id,"loss, EUR"\r\n"H-1, reopened",12.5\r\nH-2,"7"\r\n',
      opts: { column: "2" },
      values: [12.5, 7],
      format: "csv",
      column: "loss, EUR",
    },
    {
      name: "CSV with the only numeric column picked without a choice",
      text: "part,deviation_um\nK-01,-1.5\nK-02,0.25\nK-03,2\n",
      values: [-1.5, 0.25, 2],
      format: "csv",
      column: "deviation_um",
    },
    { name: "TSV with header", text: "part\tdeviation\nA\t0.5\nB\t-0.75\n", opts: { column: "deviation" }, values: [0.5, -0.75], format: "tsv" },
    { name: "semicolon-separated, guessed", text: "id;amount\n1;10\n2;20\n", opts: { column: "amount" }, values: [10, 20], format: "csv" },
    { name: "plain list with blank lines and no final newline", text: "3.5\n\n-2\n+1e-3\n  7  ", values: [3.5, -2, 0.001, 7], format: "list" },
    { name: "plain list with a header word and a BOM", text: "\uFEFFclaim_size\n100\n250\n", values: [100, 250], format: "list" },
    {
      name: "frequency table: counts column",
      text: "claims_per_policy,policies\n0,812\n1,143\n2,38\n3,7\n",
      opts: { column: "claims_per_policy", weights: "policies" },
      values: [0, 1, 2, 3],
      weights: [812, 143, 38, 7],
      kind: "counts",
      format: "csv",
    },
    {
      name: "weighted table: real weights",
      text: "loss,prob\n0,0.5\n100,0.3\n1000,0.2\n",
      opts: { column: "loss", weights: "prob" },
      values: [0, 100, 1000],
      weights: [0.5, 0.3, 0.2],
      kind: "weights",
      format: "csv",
    },
    { name: "no header, two columns, column by number", text: "1,10\n2,20\n3,30\n", opts: { column: "2" }, values: [10, 20, 30], format: "csv" },
  ];
  for (const c of cases) {
    it(c.name, async () => {
      for (const chunk of [1, 5, 64 * 1024]) {
        const r = await parseText(c.text, c.opts, chunk);
        const ctx = `${c.name} (chunks of ${chunk} bytes)`;
        expect(Array.from(r.values), ctx).toEqual(c.values);
        expect(r.format, ctx).toBe(c.format);
        if (c.column) expect(r.valueColumn.name, ctx).toBe(c.column);
        if (c.weights) {
          expect(Array.from(r.weights!), ctx).toEqual(c.weights);
          expect(r.weightKind, ctx).toBe(c.kind);
        } else expect(r.weights, ctx).toBeNull();
        expect(r.skipped.total, ctx).toBe(0);
      }
    });
  }

  it("notes what was guessed and how many blank lines were ignored", async () => {
    const r = await parseText("id;amount\n1;10\n\n2;20\n", { column: "amount" });
    expect(r.notes).toContain("Read as CSV separated by semicolon.");
    expect(r.notes).toContain("1 blank line ignored.");
  });

  it("skips bad rows when asked, and says how many and why", async () => {
    const text = "id,loss\n1,10\n2,n/a\n3,\n4,30\n5\n6,-1\n";
    const r = await parseText(text, { column: "loss", onInvalid: "skip" });
    expect(Array.from(r.values)).toEqual([10, 30, -1]);
    expect(r.skipped.total).toBe(3);
    expect(r.skipped.byReason).toEqual({ non_numeric: 1, empty: 1, field_count: 1 });
    expect(r.skipped.first).toMatchObject({ line: 3, column: 2, value: "n/a" });
    expect(r.notes.join(" ")).toMatch(/3 rows skipped: 1 whose value is not a number, 1 with an empty value cell, 1 with the wrong number of fields \(first on line 3, column 2\)/);
  });
});

describe("parseDataset: bad files get a message a person can act on", () => {
  const cases: { name: string; text: string | Buffer; opts?: Parameters<typeof parseText>[1]; code: string; message: RegExp; line?: number; column?: number }[] = [
    { name: "zero bytes", text: "", code: "empty", message: /The file is empty \(0 bytes\)/ },
    { name: "only blank lines", text: "\n\n  \n", code: "empty", message: /The file is empty/ },
    { name: "header but no rows", text: "claim_id,loss\n", opts: { column: "loss" }, code: "no_data", message: /header row \("claim_id", "loss"\) but no data rows/, line: 2 },
    {
      name: "non-numeric cell: line and column of the first, and the count",
      text: "id,loss\n1,10\n2,12.5\n3,n/a\n4,abc\n5,7\n",
      opts: { column: "loss" },
      code: "bad_values",
      message: /^Line 4, column 2 \("loss"\) holds "n\/a", which is not a number\. In all, 2 rows cannot be read: 2 rows whose value is not a number\./,
      line: 4,
      column: 2,
    },
    {
      name: "decimal comma in a semicolon file",
      text: "id;loss\n1;10,5\n2;3\n",
      opts: { column: "loss", decimal: "dot" },
      code: "bad_values",
      message: /Line 2, column 2 \("loss"\) holds "10,5", which is not a number \(it seems to use a decimal comma; choose the decimal comma in the upload options\)/,
      line: 2,
    },
    { name: "thousands separator", text: "1 200\n300\n", opts: { format: "list" }, code: "bad_values", message: /"1 200", which is not a number \(it seems to use a thousands separator; remove it\)/, line: 1 },
    { name: "NaN and Infinity are refused", text: "1\nNaN\nInfinity\n", opts: { format: "list", header: "no" }, code: "bad_values", message: /Line 2, column 1 .*"NaN".*only finite numbers are accepted.*2 rows/ },
    { name: "number too large for a double", text: "v\n1\n1e400\n", code: "bad_values", message: /Line 3, column 1 \("v"\) holds "1e400".*overflows/ },
    {
      name: "line numbers count the newlines inside quoted cells",
      text: 'id,note,loss\n1,"two\nlines",5\n2,"three\r\nline\nnote",6\n3,x,bad\n',
      opts: { column: "loss" },
      code: "bad_values",
      message: /^Line 7, column 3 \("loss"\) holds "bad"/,
      line: 7,
      column: 3,
    },
    { name: "empty cell in the value column", text: "id,loss\n1,\n2,5\n", opts: { column: "loss" }, code: "bad_values", message: /^Line 2, column 2 \("loss"\) is empty\. In all, 1 row cannot be read: 1 row with an empty value cell/ },
    { name: "every value bad", text: "v\nx\ny\n", code: "bad_values", message: /Line 2, column 1 \("v"\) holds "x".*no row holds a usable value/ },
    {
      name: "chosen comma but the file uses tabs",
      text: "part\tdev\nA\t1\nB\t2\n",
      opts: { format: "csv", column: "dev" },
      code: "wrong_delimiter",
      message: /You chose comma \(","\) as the delimiter, but no line of the file contains it; the lines are split by tab \("\\t"\)\. Choose tab/,
    },
    {
      name: "chosen plain list but the file has columns",
      text: "a,b\n1,2\n3,4\n",
      opts: { format: "list" },
      code: "wrong_delimiter",
      message: /You chose a plain list \(one number per line\), but the lines hold 2 fields separated by comma/,
    },
    {
      name: "guessed delimiter contradicted by a later line",
      text: "id,loss\n1,10\n2,20,extra,cells\n3,30\n",
      opts: { column: "loss" },
      code: "wrong_delimiter",
      message: /^Line 3 has 4 fields where the header has 2\. The delimiter guessed from the first lines \(comma\) may be wrong/,
      line: 3,
    },
    {
      name: "column name not found: lists the header",
      text: "claim_id,amount\n1,5\n",
      opts: { column: "loss" },
      code: "column_not_found",
      message: /No column "loss" for the values: the header has "claim_id", "amount"\. Give a name from the header or a column number from 1 to 2\./,
    },
    {
      name: "header read as one column that holds another delimiter",
      text: "id|loss\n1|5\n",
      opts: { format: "tsv", column: "loss" },
      code: "wrong_delimiter",
      message: /You chose tab .* split by vertical bar/,
    },
    { name: "no numeric column and no choice", text: "a,b\nx,y\n1,z\n", code: "column_ambiguous", message: /The file has 2 columns \("a", "b"\) and none of them holds only numbers in its first rows; choose the column with the values\./ },
    { name: "unclosed quote", text: 'v\n1\n"2\n3\n', code: "unclosed_quote", message: /A double quote opened on line 3 is never closed/, line: 3 },
    { name: "spreadsheet file", text: Buffer.from([0x50, 0x4b, 0x03, 0x04, 1, 2, 3]), code: "binary", message: /not a text file.*Export it as CSV/ },
    { name: "NUL bytes", text: Buffer.from("1\n2\u0000\n"), code: "binary", message: /not a text file/ },
    { name: "negative weight", text: "x,w\n1,2\n2,-1\n", opts: { column: "x", weights: "w" }, code: "bad_values", message: /Line 3, column 2 \("w"\) holds "-1", a negative weight/, line: 3, column: 2 },
    { name: "all weights zero", text: "x,w\n1,0\n2,0\n", opts: { column: "x", weights: "w" }, code: "weights", message: /Every weight in column "w" is zero/ },
    { name: "values and weights the same column", text: "x,w\n1,2\n", opts: { column: "x", weights: "1" }, code: "column_ambiguous", message: /cannot be the same column/ },
  ];
  for (const c of cases) {
    it(c.name, async () => {
      const e = await parseError(c.text, c.opts);
      expect(e.code, `${c.name}: ${e.message}`).toBe(c.code);
      expect(e.message).toMatch(c.message);
      if (c.line !== undefined) expect(e.detail.line, e.message).toBe(c.line);
      if (c.column !== undefined) expect(e.detail.column, e.message).toBe(c.column);
    });
  }

  it("stops at the value limit with the line that is one too many", async () => {
    const e = await parseError("v\n1\n2\n3\n4\n", { maxValues: 3 });
    expect(e.code).toBe("too_many_values");
    expect(e.message).toMatch(/more than 3 values \(line 5 is one too many\)/);
    expect(MAX_VALUES).toBe(1_000_000);
  });

  it("propagates a source error (e.g. the upload size limit) unchanged", async () => {
    async function* failing() {
      yield Buffer.from("v\n1\n2\n");
      throw new Error("size limit hit");
    }
    const { parseDataset } = await import("@/lib/datasets/parse");
    await expect(parseDataset(failing(), {})).rejects.toThrow("size limit hit");
  });
});

describe("sniff", () => {
  it("reports columns, header and numeric columns for the upload form", () => {
    const s = sniff("claim_id;loss;note\nH-1;10;x\nH-2;20;y\n", true);
    expect(s).toMatchObject({ format: "csv", delimiter: ";", header: true, columns: ["claim_id", "loss", "note"], numericColumns: [1], guessed: true });
  });
  it("ignores an incomplete last line when the text is only the file's head", () => {
    const s = sniff("a,b\n1,2\n3,", false);
    expect(s.rows).toEqual([["a", "b"], ["1", "2"]]);
  });
});
