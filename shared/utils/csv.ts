// CSV as RFC 4180 writes it (CRLF line ends; a field with a comma, quote or line break quoted, quotes doubled), with
// a guard against formula injection: a field starting with = + - @ tab or CR gets a leading ' so a spreadsheet shows
// it as text instead of running it (OWASP, "CSV Injection"); a plain number such as -102.00 stays a number.
export function csvCell(v: unknown): string {
  const s = v === null || v === undefined ? '' : String(v)
  const safe = /^[=+\-@\t\r]/.test(s) && !/^[+-]?\d+(\.\d+)?$/.test(s) ? `'${s}` : s
  return /[",\n\r]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe
}

/** Rows (the first one the header) as one CSV text, ending with CRLF. */
export function toCsv(rows: ReadonlyArray<ReadonlyArray<unknown>>): string {
  return `${rows.map(r => r.map(csvCell).join(',')).join('\r\n')}\r\n`
}
