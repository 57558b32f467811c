import { describe, expect, it } from "vitest";
import Papa from "papaparse";
import { prepareReportsImport } from "@/features/exchange/server";
import type { Actor } from "@/features/shared/roles";

// The import reads a file in slices of records (so a 20,000-row file never holds the event loop for long). The
// reference here is papaparse itself reading the whole file in one call, as the import did before: the slices must
// give the same rows, the same ragged-row numbers and the same refusal.
const admin = { id: "admin-1", role: "admin", name: "Admin" } as unknown as Actor;
const header = "fish_count,agent_slug,started_on,notes";

function whole(text: string) {
  const p = Papa.parse<Record<string, string>>(text, {
    header: true,
    comments: "#",
    skipEmptyLines: "greedy",
    transformHeader: (h) => h.trim(),
  });
  const ragged = new Map<number, string>();
  for (const e of p.errors) if (e.type === "FieldMismatch" && e.row !== undefined) ragged.set(e.row + 2, e.message);
  return { rows: p.data, ragged };
}

describe("reading an import file in slices", () => {
  it("gives the rows and ragged-row numbers of one whole-file parse, across slice edges", async () => {
    const lines: string[] = ["# exported by a club", header];
    for (let n = 0; n < 1_730; n++) {
      if (n === 300) lines.push('# a comment line with a stray " quote');
      if (n === 640) lines.push("");
      // A quoted note holding line breaks and a doubled quote, right at a slice edge (500 records a slice).
      if (n === 499 || n === 500 || n === 1_001)
        lines.push(`${n % 9},hydrogen-peroxide,2020-01-01,"line one\nline ""two""\r\nline three"`);
      else if (n === 1_204)
        lines.push(`${n % 9},hydrogen-peroxide`); // too few cells
      else if (n === 1_500)
        lines.push(`${n % 9},hydrogen-peroxide,2020-01-01,note,extra`); // too many
      else lines.push(`${n % 9},hydrogen-peroxide,2020-01-0${1 + (n % 9)},"note ${n}, with a comma"`);
    }
    for (const eol of ["\n", "\r\n"]) {
      const text = lines.join(eol);
      const sliced = await prepareReportsImport(admin, text);
      const ref = whole(text);
      expect(sliced.rows.length).toBe(1_730);
      expect(sliced.rows).toEqual(ref.rows);
      expect([...sliced.ragged.keys()].sort((a, b) => a - b)).toEqual([...ref.ragged.keys()].sort((a, b) => a - b));
      expect(sliced.ragged.size).toBe(2);
      expect(sliced.rows[500]!.notes).toBe('line one\nline "two"\r\nline three');
    }
  });

  it("refuses an unclosed quote with the row it starts in, and a file without the needed columns", async () => {
    const rows = Array.from({ length: 900 }, (_, n) => `${n % 9},hydrogen-peroxide,2020-01-01,ok`);
    rows[700] = `1,hydrogen-peroxide,2020-01-01,"never closed`;
    await expect(prepareReportsImport(admin, [header, ...rows].join("\n"))).rejects.toMatchObject({
      code: "bad_request",
      message: expect.stringMatching(/could not be read as CSV .*row 702\)/),
    });
    rows[700] = "1,hydrogen-peroxide,2020-01-01,ok";
    rows[100] = `1,hydrogen-peroxide,2020-01-01,"never closed`;
    await expect(prepareReportsImport(admin, [header, ...rows].join("\n"))).rejects.toMatchObject({
      message: expect.stringMatching(/row 102\)/),
    });
    await expect(prepareReportsImport(admin, "fish_count,notes\n3,x")).rejects.toMatchObject({ code: "invalid" });
    await expect(prepareReportsImport(admin, "")).rejects.toMatchObject({ code: "invalid" });
  });
});
