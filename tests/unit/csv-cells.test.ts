import { describe, expect, it } from "vitest";
import Papa from "papaparse";
import { controlCharacterIn, csvWriteOptions, unneutralise } from "@/features/exchange/server";

// The leading characters a spreadsheet treats as a formula (=, +, -, @, tab, carriage return) are the ones the
// OWASP "CSV Injection" page lists; the leading apostrophe as the neutraliser is its recommendation too.
const write = (rows: unknown[][]) => Papa.unparse(rows, csvWriteOptions);
const read = (csv: string) => Papa.parse<string[]>(csv).data;

describe("spreadsheet-safe CSV cells", () => {
  it("prefixes text cells that a spreadsheet would run, and leaves numbers and other text alone", () => {
    const csv = write([
      [
        '=HYPERLINK("http://example.org")',
        "+1",
        "-cmd",
        "@SUM(A1)",
        "\tx",
        "\r=1",
        -4,
        2.5,
        true,
        "plain",
        "'quoted",
        "a=b",
      ],
    ]);
    expect(read(csv)[0]).toEqual([
      '\'=HYPERLINK("http://example.org")',
      "'+1",
      "'-cmd",
      "'@SUM(A1)",
      "'\tx",
      "'\r=1",
      "-4",
      "2.5",
      "true",
      "plain",
      "'quoted",
      "a=b",
    ]);
  });

  it("neutralises a formula that continues on a second line (papaparse's default pattern does not)", () => {
    expect(read(write([["=cmd|' /C calc'!A0\nsecond line"]]))[0]![0]).toBe("'=cmd|' /C calc'!A0\nsecond line");
    expect(read(Papa.unparse([["=cmd\nsecond line"]], { escapeFormulae: true }))[0]![0]).toBe("=cmd\nsecond line");
  });

  it("undoes exactly what it did, so every text round-trips", () => {
    for (const text of [
      "=1+1",
      "'=already typed with an apostrophe",
      "''=two",
      "'plain apostrophe",
      "-3 fish lost",
      "plain",
      "",
      "@",
      "+",
    ]) {
      expect(unneutralise(read(write([[text, "x"]]))[0]![0]!)).toBe(text);
    }
  });

  it("names the first control character in a cell, allowing tab and line breaks", () => {
    expect(controlCharacterIn("a\u0000b")).toBe("U+0000");
    expect(controlCharacterIn("bell\u0007")).toBe("U+0007");
    expect(controlCharacterIn("esc\u001b[0m")).toBe("U+001B");
    expect(controlCharacterIn("tab\tnew\nline\r\n")).toBeNull();
  });
});
