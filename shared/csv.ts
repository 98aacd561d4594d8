// CSV written for people to open in a spreadsheet. Papa Parse does the RFC 4180 quoting; text cells
// that a spreadsheet would run as a formula get a leading apostrophe (OWASP, "CSV Injection").
import Papa from 'papaparse'
import { singleLine } from './text/plain'

/** A cell: numbers stay numbers (a negative figure is never touched); text is kept on one line. */
export type CsvCell = string | number

/** Text that starts a formula in common spreadsheets: `=`, `+`, `-`, `@`, tab or CR (OWASP "CSV Injection"). */
export const FORMULA_START = /^[=+\-@\t\r]/

/** Rows as CSV text, one `\n`-ended line per row: control characters in text cells become spaces, formula-like text is neutralised. */
export function toCsv(rows: readonly (readonly CsvCell[])[]): string {
  const safe = rows.map(row => row.map(cell => (typeof cell === 'number' ? cell : singleLine(cell))))
  const text = Papa.unparse(safe, { newline: '\n', escapeFormulae: FORMULA_START, quotes: false })
  // Cells are single-line, so each row is one line; a row of one empty cell would be an empty line,
  // which readers skip, so it is written as one quoted empty field (RFC 4180 §2.5).
  return `${text.split('\n').map(line => (line === '' ? '""' : line)).join('\n')}\n`
}
