import { describe, expect, it } from "vitest";
import { FileProblem, decodeUtf8, parseCsvBytes, readNumber } from "~/.server/intake/parse";

const bytes = (s: string) => new TextEncoder().encode(s);

describe("parseCsvBytes", () => {
  it("reads comma, semicolon and tab files alike", () => {
    for (const sep of [",", ";", "\t"]) {
      const t = parseCsvBytes(bytes(`a${sep}b${sep}c\r\n1${sep}2${sep}3\r\n`), { decimalComma: false });
      expect(t.delimiter).toBe(sep);
      expect(t.headers).toEqual(["a", "b", "c"]);
      expect(t.rows).toEqual([["1", "2", "3"]]);
    }
  });

  it("drops a byte-order mark and says it was there", () => {
    const t = parseCsvBytes(new Uint8Array([0xef, 0xbb, 0xbf, ...bytes("code,x\nA,1\n")]), { decimalComma: false });
    expect(t.hadBom).toBe(true);
    expect(t.headers[0]).toBe("code");
  });

  it("keeps quoted newlines inside a cell and numbers rows as a spreadsheet does", () => {
    const t = parseCsvBytes(bytes('code,notes\nA,"two\nlines"\nB,x\n'), { decimalComma: false });
    expect(t.rows).toEqual([
      ["A", "two\nlines"],
      ["B", "x"],
    ]);
    expect(t.rowNumbers).toEqual([2, 3]);
  });

  it("guesses semicolon, not comma, when decimal commas are declared", () => {
    const t = parseCsvBytes(bytes("code;mass\nA;12,5\nB;3,25\n"), { decimalComma: true });
    expect(t.delimiter).toBe(";");
  });

  it("refuses empty, header-only, binary, non-UTF-8 and one-column files with a sentence", () => {
    expect(() => decodeUtf8(new Uint8Array())).toThrow(/empty/);
    expect(() => parseCsvBytes(bytes("a,b\n"), { decimalComma: false })).toThrow(/no data rows/);
    expect(() => parseCsvBytes(new Uint8Array([0x50, 0x4b, 3, 4, 0, 0]), { decimalComma: false })).toThrow(/binary/);
    expect(() => parseCsvBytes(new Uint8Array([0x61, 0x2c, 0xb0, 0x0a, 0x31, 0x2c, 0x32]), { decimalComma: false })).toThrow(/not UTF-8/);
    expect(() => parseCsvBytes(bytes("a;b\n1;2\n"), { delimiter: ",", decimalComma: false })).toThrow(/semicolon/);
    expect(() => parseCsvBytes(bytes("a;b\n1;2\n"), { delimiter: ",", decimalComma: false })).toThrow(FileProblem);
  });
});

describe("readNumber", () => {
  it("reads plain numbers, blanks as null, and decimal commas only when declared", () => {
    expect(readNumber(" 12.5 ", false)).toEqual({ ok: true, value: 12.5 });
    expect(readNumber("", false)).toEqual({ ok: true, value: null });
    expect(readNumber("12,5", true)).toEqual({ ok: true, value: 12.5 });
    expect(readNumber("12,5", false)).toEqual({ ok: false, reason: "decimal-comma" });
    expect(readNumber("1,234.5", false)).toEqual({ ok: false, reason: "not-a-number" });
    expect(readNumber("=HYPERLINK(1)", false)).toEqual({ ok: false, reason: "not-a-number" });
    expect(readNumber("-3", false)).toEqual({ ok: true, value: -3 });
  });
});
