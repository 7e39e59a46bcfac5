// CSV exports: numbers stay numbers, formula-like text is defused (DESIGN.md "Architecture").
import { describe, expect, it } from "vitest";
import { csvCell, rounded, toCsv } from "~/.server/csv";

describe("csvCell", () => {
  it("writes numbers as numbers, negative ones included", () => {
    expect(csvCell(29.03)).toBe("29.03");
    expect(csvCell(-4.5)).toBe("-4.5");
    expect(csvCell(0)).toBe("0");
  });

  it("leaves numeric text alone even when it starts with - or +", () => {
    expect(csvCell("-12.5")).toBe("-12.5");
    expect(csvCell("+3")).toBe("+3");
    expect(csvCell("-1e-3")).toBe("-1e-3");
  });

  it.each([
    ["=SUM(A1:A9)", "'=SUM(A1:A9)"],
    ["+cmd|' /C calc'!A0", "'+cmd|' /C calc'!A0"],
    ["-2+3", "'-2+3"],
    ["@SUM(1)", "'@SUM(1)"],
    ["\tindent", "'\tindent"],
  ])("guards %j with a leading apostrophe", (input, expected) => {
    expect(csvCell(input)).toBe(expected);
  });

  it("guards a leading carriage return and then quotes the cell", () => {
    expect(csvCell("\r=1")).toBe(`"'\r=1"`);
  });

  it("quotes commas, quotes and line breaks (RFC 4180)", () => {
    expect(csvCell('Leaf mould, "aged"')).toBe('"Leaf mould, ""aged"""');
    expect(csvCell("two\nlines")).toBe('"two\nlines"');
  });

  it("writes empty cells for missing values and non-finite numbers", () => {
    expect(csvCell(null)).toBe("");
    expect(csvCell(undefined)).toBe("");
    expect(csvCell(Number.NaN)).toBe("");
  });

  it("does not touch ordinary text, including a hyphen inside it", () => {
    expect(csvCell("YWC-2025-A")).toBe("YWC-2025-A");
  });
});

describe("toCsv and rounded", () => {
  it("joins rows with CRLF and rounds without turning numbers into text", () => {
    expect(toCsv([["Plot", "kg"], [101, rounded(29.0322, 2)]])).toBe("Plot,kg\r\n101,29.03\r\n");
    expect(rounded(null, 2)).toBeNull();
  });
});
