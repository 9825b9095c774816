// Reads a run file or an order document as a program would: RFC 4180 records (papaparse), split into blocks at the
// records whose fields are all empty (head, table, totals).
import Papa from 'papaparse';
import { expect } from 'vitest';

/** The file's records (a leading byte-order mark dropped, the empty string after the last CRLF not counted). */
export function csvRecords(text: string, delimiter = ','): string[][] {
  const body = text.startsWith('\uFEFF') ? text.slice(1) : text;
  const r = Papa.parse<string[]>(body, { delimiter, newline: '\r\n' });
  expect(r.errors).toEqual([]);
  const rows = r.data;
  const last = rows[rows.length - 1];
  if (last && last.length === 1 && last[0] === '') rows.pop();
  return rows;
}

/** The file's blocks: the runs of records between all-empty records. */
export function csvBlocks(text: string, delimiter = ','): string[][][] {
  const blocks: string[][][] = [[]];
  for (const row of csvRecords(text, delimiter)) {
    if (row.every((c) => c === '')) blocks.push([]);
    else blocks[blocks.length - 1]!.push(row);
  }
  return blocks;
}

/** A head or totals block as label → value (the first two fields of each record). */
export function labelled(block: readonly (readonly string[])[]): Map<string, string> {
  return new Map(block.map((r) => [r[0]!, r[1] ?? ''] as const));
}
