// Spreadsheet-safe CSV cells. A spreadsheet runs a cell that starts with = + - @ (or a tab or CR before one) as a
// formula; the exports prefix such text cells with an apostrophe, which spreadsheets show as text, and the import
// takes exactly that apostrophe off again. Numbers are written as numbers and never prefixed.

/**
 * Text cells the exports prefix. Leading apostrophes are part of the pattern so that a cell that really starts
 * with "'=" also gets one more, and undoing takes exactly one off: the round trip is exact for every text.
 * (No `.*$` after it: papaparse's own default pattern misses a formula that continues on a second line.)
 */
export const FORMULA_START = /^'*[=+\-@\t\r]/;

/** Undoes the exports' neutralising on one imported text cell. */
export function unneutralise(cell: string): string {
  return FORMULA_START.test(cell) && cell.startsWith("'") ? cell.slice(1) : cell;
}

// C0 control characters other than tab, line feed and carriage return (a CSV line break inside a quoted cell).
// eslint-disable-next-line no-control-regex -- matching control characters is this pattern's purpose
const CONTROL = /[\u0000-\u0008\u000b\u000c\u000e-\u001f]/;

/** The first control character in a cell, as "U+0000", or null. */
export function controlCharacterIn(cell: string): string | null {
  const m = CONTROL.exec(cell);
  return m ? `U+${m[0].charCodeAt(0).toString(16).toUpperCase().padStart(4, "0")}` : null;
}
