// Tab-separated text as programs put it on the clipboard: cells split by tabs, rows by CRLF, LF or CR; a cell that
// holds a tab, a line break or a quote comes wrapped in double quotes with its inner quotes doubled. Pure.
import { grouped } from './format.ts';
import { PARAM_NAME_SHAPE } from './params.ts';

/** Largest paste we accept; beyond it the text is refused with a message rather than freezing the page. */
export const TSV_LIMITS = {
  chars: 5_000_000,
  cells: 200_000,
} as const;

export type TsvResult = { ok: true; rows: string[][] } | { ok: false; error: string };

const isBreak = (c: string | undefined): boolean => c === '\t' || c === '\n' || c === '\r';

/**
 * Reads tab-separated text. One final line break is dropped (programs end the last row with one); blank lines inside
 * the text stay as rows with one empty cell. A quote opens a quoted cell only as a cell's first character and only
 * when a closing quote follows at the cell's end; otherwise it is an ordinary character (as in `5" rack`).
 */
export function parseTsv(text: string): TsvResult {
  if (typeof text !== 'string') return { ok: false, error: 'the pasted content is not text' };
  if (text.length > TSV_LIMITS.chars) {
    return { ok: false, error: `the pasted text is ${grouped(text.length)} characters; at most ${grouped(TSV_LIMITS.chars)} are read at once` };
  }
  const rows: string[][] = [];
  if (text === '') return { ok: true, rows };
  const n = text.length;
  let row: string[] = [];
  let cells = 0;
  let i = 0;
  for (;;) {
    let cell: string | undefined;
    if (text[i] === '"') {
      let j = i + 1;
      let value = '';
      let closed = false;
      while (j < n) {
        const c = text[j]!;
        if (c === '"') {
          if (text[j + 1] === '"') {
            value += '"';
            j += 2;
            continue;
          }
          closed = true;
          j += 1;
          break;
        }
        value += c;
        j += 1;
      }
      if (closed && (j >= n || isBreak(text[j]))) {
        cell = value;
        i = j;
      }
    }
    if (cell === undefined) {
      let j = i;
      while (j < n && !isBreak(text[j])) j += 1;
      cell = text.slice(i, j);
      i = j;
    }
    row.push(cell);
    cells += 1;
    if (cells > TSV_LIMITS.cells) return { ok: false, error: `the pasted text has more than ${grouped(TSV_LIMITS.cells)} cells; paste it in parts` };
    if (i >= n) {
      rows.push(row);
      break;
    }
    const c = text[i];
    if (c === '\t') {
      i += 1;
      if (i >= n) {
        row.push('');
        rows.push(row);
        break;
      }
      continue;
    }
    i += c === '\r' && text[i + 1] === '\n' ? 2 : 1;
    rows.push(row);
    row = [];
    if (i >= n) break;
  }
  return { ok: true, rows };
}

const NEEDS_QUOTES = /[\t\r\n"]/;

/** One cell as tab-separated text: quoted (inner quotes doubled) when it holds a tab, a line break or a quote. */
export function tsvCell(cell: string): string {
  return NEEDS_QUOTES.test(cell) ? `"${cell.replace(/"/g, '""')}"` : cell;
}

/**
 * Rows to tab-separated text, rows joined by LF with no final line break (what a paste into one cell expects). A last
 * row of one empty cell is written as "" so that it is not read as the dropped final line break.
 */
export function formatTsv(rows: readonly (readonly string[])[]): string {
  const out = rows.map((r) => r.map(tsvCell).join('\t'));
  const last = rows[rows.length - 1];
  if (last && last.length === 1 && last[0] === '') out[out.length - 1] = '""';
  return out.join('\n');
}

// A text cell that starts with = + - or @ would run as a formula when pasted into a spreadsheet program (OWASP CSV
// injection guidance); copies of text cells get a leading apostrophe, which those programs hide and which our own
// paste takes off again.
const FORMULA_START = /^[=+\-@]/;

/** A text cell made safe for other programs: a leading apostrophe before = + - @. Numbers are not passed here. */
export function guardText(text: string): string {
  return FORMULA_START.test(text) ? `'${text}` : text;
}

/** Undoes `guardText`: an apostrophe followed by = + - @ is dropped. */
export function unguardText(text: string): string {
  return text.length > 1 && text[0] === "'" && FORMULA_START.test(text.slice(1)) ? text.slice(1) : text;
}

/** A heading as written in a header row: trimmed, lower case, with a trailing unit in brackets dropped ("load_w (W)"). */
export function headingKey(text: string): string {
  return text
    .trim()
    .replace(/\s*[([][^)\]]*[)\]]\s*$/, '')
    .trim()
    .toLowerCase();
}

/**
 * Recognises a header row: every non-empty cell is a name (lower-case letters, digits and _, or a known heading)
 * and at least one is a heading the grid knows. Returns the key of each column (undefined for blank headings), or
 * undefined when the row reads as data.
 */
export function matchHeader(row: readonly string[], known: ReadonlySet<string>): (string | undefined)[] | undefined {
  let matched = 0;
  const keys: (string | undefined)[] = [];
  for (const cell of row) {
    const k = headingKey(cell);
    if (k === '') {
      keys.push(undefined);
      continue;
    }
    if (known.has(k)) matched += 1;
    else if (!PARAM_NAME_SHAPE.test(k)) return undefined;
    keys.push(k);
  }
  return matched > 0 ? keys : undefined;
}
