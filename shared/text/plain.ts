// Text that goes into a single line of something else (a CSV comment, a header value, a file name).

/** C0 and C1 controls (CR, LF, tab, NUL…), DEL, the Unicode line and paragraph separators, and the bidi overrides that can disguise a file name. */
const BREAKING = /[\p{Cc}\u2028\u2029\u200E\u200F\u202A-\u202E\u2066-\u2069]+/gu

/** The text on one line: every control character becomes one space, runs of spaces collapse, ends trimmed; broken surrogates become U+FFFD. */
export function singleLine(text: string): string {
  return text.toWellFormed().replace(BREAKING, ' ').replace(/ {2,}/g, ' ').trim()
}

/** An ASCII stand-in for a file name: accents dropped, anything else outside printable ASCII (and `"` `\`) as `_`, the extension kept. */
export function asciiFileName(name: string, fallback = 'file'): string {
  const ascii = singleLine(name).normalize('NFKD').replace(/[\u0300-\u036F]/g, '').replace(/[^\x20-\x7E]|["\\/]/g, '_').replace(/_{2,}/g, '_')
  const dot = ascii.lastIndexOf('.')
  const stem = dot > 0 ? ascii.slice(0, dot) : ascii
  const ext = dot > 0 ? ascii.slice(dot) : ''
  // A name that was all non-ASCII leaves only underscores and spaces: say "file" instead.
  return /[A-Za-z0-9]/.test(stem) ? `${stem.trim()}${ext}` : `${fallback}${ext.replace(/_/g, '')}`
}
