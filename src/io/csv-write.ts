// CSV writing (RFC 4180) with formula-injection neutralising, for every export that may be opened in a spreadsheet.
//
// RFC 4180 §2: records end in CRLF; a field holding a comma, a quote or a line break is quoted, inner quotes doubled.
// Injection (OWASP CSV injection guidance): a text cell starting with = + - @ tab, CR or NUL gets a leading ' and is
// quoted, so a spreadsheet shows it as text instead of running it. Numbers we write ourselves stay plain numbers.

export type CsvCell = string | number | boolean | null | undefined;

const DANGEROUS_START = /^[=+\-@\t\r\0]/;
const NEEDS_QUOTES = /[",\r\n]/;

/** One field as it appears in the file. Non-finite numbers and null/undefined are empty fields. */
export function csvField(cell: CsvCell): string {
  if (cell === null || cell === undefined) return '';
  if (typeof cell === 'number') return Number.isFinite(cell) ? String(cell) : '';
  if (typeof cell === 'boolean') return cell ? 'TRUE' : 'FALSE';
  if (DANGEROUS_START.test(cell)) return `"'${cell.replace(/"/g, '""')}"`;
  return NEEDS_QUOTES.test(cell) ? `"${cell.replace(/"/g, '""')}"` : cell;
}

/** Rows to CSV text: fields joined by commas, every record (the last too) ended by CRLF. */
export function toCsv(rows: readonly (readonly CsvCell[])[]): string {
  let out = '';
  for (const row of rows) out += row.map(csvField).join(',') + '\r\n';
  return out;
}
