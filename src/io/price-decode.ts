// Turns the bytes of a price file into text: UTF-8 (with or without byte-order mark), UTF-16 with a mark, or
// Windows-1252 when the bytes are not valid UTF-8. Binary files are refused with a message saying what to do.
// The encoding may also be chosen (automatic, UTF-8, Windows-1252). When a file is UTF-8 but for a few lines (a row
// pasted in from an older program), the lines that are not are named, so their letters can be checked; read
// automatically they are taken as Windows-1252 and the rest as UTF-8, read as UTF-8 the file is refused.

export const ENCODINGS = {
  utf8: 'UTF-8',
  utf8Bom: 'UTF-8 with byte-order mark',
  utf16le: 'UTF-16 LE',
  utf16be: 'UTF-16 BE',
  windows1252: 'Windows-1252',
} as const;
export type EncodingName = (typeof ENCODINGS)[keyof typeof ENCODINGS];

/** How to read a file without a UTF-16 byte-order mark: find out, or as the user says. */
export const ENCODING_CHOICES = { auto: 'auto', utf8: 'utf-8', windows1252: 'windows-1252' } as const;
export type EncodingChoice = (typeof ENCODING_CHOICES)[keyof typeof ENCODING_CHOICES];

export type DecodeResult =
  | {
      ok: true;
      text: string;
      encoding: EncodingName;
      /** Lines (1-based) that are not valid UTF-8 in a file whose other lines are: read as Windows-1252. */
      nonUtf8Lines?: number[];
      /** Set when the text may hold wrong letters: what to check, with line numbers. */
      warning?: string;
    }
  | { ok: false; reason: string };

/**
 * Windows-1252 bytes 0x80–0x9F. Decoded by table because some runtimes treat the label as Latin-1 and would give
 * C1 control characters for €, curly quotes and dashes. 0 marks the five unassigned bytes.
 */
const CP1252_HIGH = [
  0x20ac, 0, 0x201a, 0x0192, 0x201e, 0x2026, 0x2020, 0x2021, 0x02c6, 0x2030, 0x0160, 0x2039, 0x0152, 0, 0x017d, 0,
  0, 0x2018, 0x2019, 0x201c, 0x201d, 0x2022, 0x2013, 0x2014, 0x02dc, 0x2122, 0x0161, 0x203a, 0x0153, 0, 0x017e, 0x0178,
];

export function decodeWindows1252(bytes: Uint8Array): string {
  const parts: string[] = [];
  const CHUNK = 8192;
  for (let start = 0; start < bytes.length; start += CHUNK) {
    const end = Math.min(bytes.length, start + CHUNK);
    const codes = new Array<number>(end - start);
    for (let i = start; i < end; i++) {
      const b = bytes[i]!;
      codes[i - start] = b >= 0x80 && b <= 0x9f ? CP1252_HIGH[b - 0x80] || b : b;
    }
    parts.push(String.fromCharCode(...codes));
  }
  return parts.join('');
}

/** Share of suspicious control characters above which a file is taken for binary. */
const CONTROL_SHARE_LIMIT = 0.02;

function binaryReason(text: string): string | undefined {
  const sample = text.length > 65536 ? text.slice(0, 65536) : text;
  if (sample.includes('\u0000')) {
    return 'this looks like a binary file (it contains NUL bytes), not a text price list; save the list as CSV text and import that';
  }
  let control = 0;
  for (let i = 0; i < sample.length; i++) {
    const c = sample.charCodeAt(i);
    if ((c < 0x20 && c !== 0x09 && c !== 0x0a && c !== 0x0d && c !== 0x0c) || c === 0x7f) control++;
  }
  if (sample.length > 0 && control / sample.length > CONTROL_SHARE_LIMIT) {
    return `this looks like a binary file (${control} control characters in the first ${sample.length}), not a text price list; save the list as CSV text and import that`;
  }
  return undefined;
}

function startsWith(bytes: Uint8Array, ...sig: number[]): boolean {
  return bytes.length >= sig.length && sig.every((b, i) => bytes[i] === b);
}

/** Reads `choice` as given in a form or on the command line ("auto", "utf-8", "utf8", "windows-1252", "cp1252"). */
export function parseEncodingChoice(text: string): EncodingChoice | undefined {
  const t = text.trim().toLowerCase();
  if (t === 'auto' || t === 'automatic') return ENCODING_CHOICES.auto;
  if (t === 'utf-8' || t === 'utf8') return ENCODING_CHOICES.utf8;
  if (t === 'windows-1252' || t === 'cp1252' || t === 'windows1252') return ENCODING_CHOICES.windows1252;
  return undefined;
}

export function decodePriceBytes(bytes: Uint8Array, choice: EncodingChoice = ENCODING_CHOICES.auto): DecodeResult {
  if (bytes.length === 0) return { ok: false, reason: 'the file is empty' };
  if (startsWith(bytes, 0x50, 0x4b, 0x03, 0x04)) {
    return {
      ok: false,
      reason: 'this is a compressed (zip) file, perhaps a spreadsheet workbook; save the price list as CSV text and import that',
    };
  }
  const decoded = decodeText(bytes, choice);
  if (!decoded.ok) return decoded;
  const binary = binaryReason(decoded.text);
  if (binary) return { ok: false, reason: binary };
  if (decoded.text.trim() === '') return { ok: false, reason: 'the file holds only blank space: no header and no rows' };
  return decoded;
}

function decodeText(bytes: Uint8Array, choice: EncodingChoice): DecodeResult {
  if (startsWith(bytes, 0xff, 0xfe) || startsWith(bytes, 0xfe, 0xff)) {
    const le = bytes[0] === 0xff;
    if ((bytes.length - 2) % 2 !== 0) {
      return { ok: false, reason: `the file is marked as UTF-16 but has an odd number of bytes; it is damaged or not UTF-16` };
    }
    try {
      const text = new TextDecoder(le ? 'utf-16le' : 'utf-16be', { fatal: true, ignoreBOM: true }).decode(bytes.subarray(2));
      return { ok: true, text, encoding: le ? ENCODINGS.utf16le : ENCODINGS.utf16be };
    } catch {
      return { ok: false, reason: `the file is marked as UTF-16 ${le ? 'LE' : 'BE'} but its bytes are not valid UTF-16` };
    }
  }
  const bom = startsWith(bytes, 0xef, 0xbb, 0xbf);
  if (choice === ENCODING_CHOICES.windows1252) {
    const text = decodeWindows1252(bom ? bytes.subarray(3) : bytes);
    const utf8 = tryUtf8(bytes);
    // Bytes that are valid UTF-8 and hold letters beyond ASCII are almost surely UTF-8: say so, the choice stands.
    return utf8 !== undefined && hasNonAscii(bytes)
      ? { ok: true, text, encoding: ENCODINGS.windows1252, warning: 'the file reads as UTF-8 text: read as Windows-1252, letters beyond A–Z may be wrong; choose automatic or UTF-8' }
      : { ok: true, text, encoding: ENCODINGS.windows1252 };
  }
  const body = bom ? bytes.subarray(3) : bytes;
  const encoding = bom ? ENCODINGS.utf8Bom : ENCODINGS.utf8;
  const whole = tryUtf8(body);
  if (whole !== undefined) return { ok: true, text: whole, encoding };
  const lines = utf8Lines(body);
  const bad = lines.filter((l) => !l.valid).map((l) => l.number);
  if (choice === ENCODING_CHOICES.utf8 || bom) {
    return {
      ok: false,
      reason: `the file ${bom ? 'starts with a UTF-8 byte-order mark' : 'was to be read as UTF-8'} but ${lineList(bad)} ${bad.length === 1 ? 'is' : 'are'} not valid UTF-8; save the file again as UTF-8, or choose Windows-1252`,
    };
  }
  if (!lines.some((l) => l.valid && l.nonAscii)) return { ok: true, text: decodeWindows1252(body), encoding: ENCODINGS.windows1252 };
  // UTF-8 letters on some lines, bytes that are not UTF-8 on others: each line read as what it is.
  const parts: string[] = [];
  for (const l of lines) {
    const slice = body.subarray(l.start, l.end);
    parts.push(l.valid ? tryUtf8(slice)! : decodeWindows1252(slice), decodeWindows1252(body.subarray(l.end, l.next)));
  }
  return {
    ok: true,
    text: parts.join(''),
    encoding,
    nonUtf8Lines: bad,
    warning: `the file is UTF-8 but ${lineList(bad)} ${bad.length === 1 ? 'is' : 'are'} not: ${bad.length === 1 ? 'it was' : 'they were'} read as Windows-1252, so check ${bad.length === 1 ? 'its' : 'their'} letters, or save the file again as UTF-8`,
  };
}

/** "line 7", "lines 3, 9 and 12", "lines 3, 9, 12, … (25 lines)". */
function lineList(lines: readonly number[]): string {
  if (lines.length === 1) return `line ${lines[0]}`;
  const MAX = 10;
  if (lines.length > MAX) return `lines ${lines.slice(0, MAX).join(', ')}, … (${lines.length} lines)`;
  return `lines ${lines.slice(0, -1).join(', ')} and ${lines[lines.length - 1]}`;
}

interface ByteLine {
  /** 1-based line number. */
  number: number;
  start: number;
  /** End of the line's text, before its line break. */
  end: number;
  /** Start of the next line, after the line break (CRLF, LF or CR). */
  next: number;
  valid: boolean;
  nonAscii: boolean;
}

/**
 * The file's lines with whether each is valid UTF-8. A line break byte (0A, 0D) is never part of a multi-byte UTF-8
 * sequence (RFC 3629 §3), so a line is valid UTF-8 by itself exactly when it is valid within the file.
 */
export function utf8Lines(bytes: Uint8Array): ByteLine[] {
  const out: ByteLine[] = [];
  const decoder = new TextDecoder('utf-8', { fatal: true, ignoreBOM: true });
  let start = 0;
  let number = 1;
  while (start <= bytes.length) {
    let end = start;
    while (end < bytes.length && bytes[end] !== 0x0a && bytes[end] !== 0x0d) end++;
    let next = end;
    if (bytes[next] === 0x0d) next++;
    if (bytes[next] === 0x0a) next++;
    const slice = bytes.subarray(start, end);
    let nonAscii = false;
    for (const b of slice) if (b >= 0x80) nonAscii = true;
    let valid = true;
    if (nonAscii) {
      try {
        decoder.decode(slice);
      } catch {
        valid = false;
      }
    }
    out.push({ number, start, end, next, valid, nonAscii });
    if (next === end) break;
    start = next;
    number++;
  }
  return out;
}

function hasNonAscii(bytes: Uint8Array): boolean {
  for (const b of bytes) if (b >= 0x80) return true;
  return false;
}

function tryUtf8(bytes: Uint8Array): string | undefined {
  try {
    return new TextDecoder('utf-8', { fatal: true, ignoreBOM: true }).decode(bytes);
  } catch {
    return undefined;
  }
}
