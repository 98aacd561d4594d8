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
  return `${Papa.unparse(safe, { newline: '\n', escapeFormulae: FORMULA_START, quotes: false })}\n`
}
