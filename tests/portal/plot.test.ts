// The explorer's plot helpers (lib/portal/plot.ts): the plotted range takes in an atom beside it, and every value
// read out or exported carries the API's per-point bound.
import { describe, expect, it } from "vitest";
import { plotCsv, plotRows, rangeWithAtoms, withBound, type LawTable } from "@/lib/portal/plot";

describe("plot range and atoms", () => {
  it("widens to an atom within one span of the range (a compound's P(N = 0) at 0 beside a body at 200..1200)", () => {
    expect(rangeWithAtoms(200, 1200, [{ x: 0 }])).toEqual({ lo: 0, hi: 1200, widened: true });
    expect(rangeWithAtoms(-1, 1, [{ x: 2.5 }])).toEqual({ lo: -1, hi: 2.5, widened: true });
  });
  it("leaves the range alone for atoms inside it or far from it", () => {
    expect(rangeWithAtoms(0, 10, [{ x: 0 }, { x: 5 }])).toEqual({ lo: 0, hi: 10, widened: false });
    expect(rangeWithAtoms(1e6, 1.2e6, [{ x: 0 }])).toEqual({ lo: 1e6, hi: 1.2e6, widened: false });
  });
});

describe("bounds beside plotted values", () => {
  const table: LawTable = {
    x: [0, 1, 2],
    pdf: [0.1, 0.2, 0.3],
    cdf: [0.5, 0.6, 0.7],
    sf: [0.5, 0.4, 0.3],
    atoms: [{ x: 0, p: 0.25 }],
    diagnostics: { pointError: { pdf: [1e-12, null, 3e-12], cdf: [2e-13, 2e-13, 2e-13], sf: [4e-14, 5e-14, 6e-14] } },
  };
  it("rows carry the per-point bounds; a missing bound stays null, never 0", () => {
    const rows = plotRows(table);
    expect(rows[0].err).toEqual({ density: 1e-12, cdf: 2e-13, sf: 4e-14 });
    expect(rows[1].err.density).toBeNull();
    // without sf in the answer, 1 - cdf carries the cdf's bound
    expect(plotRows({ ...table, sf: undefined })[2].err.sf).toBe(2e-13);
    expect(plotRows({ ...table, diagnostics: undefined })[0].err).toEqual({ density: null, cdf: null, sf: null });
  });
  it("the read-out and the CSV show each value with its bound", () => {
    expect(withBound(0.003282, 1.234e-12)).toBe("0.003282 ± 1.2e-12");
    expect(withBound(0.5, null)).toBe("0.5 (no bound)");
    const lines = plotCsv(table, plotRows(table)).split("\r\n");
    expect(lines[0]).toBe("x,pdf,cdf,sf,pdf_error,cdf_error,sf_error");
    expect(lines[1]).toBe("0,0.1,0.5,0.5,1e-12,2e-13,4e-14");
    expect(lines[2]).toBe("1,0.2,0.6,0.4,,2e-13,5e-14");
    expect(lines.slice(4, 7)).toEqual(["", "atom_x,atom_probability", "0,0.25"]);
  });
});
