// Turns the bytes of a price file into text: UTF-8 (with or without byte-order mark), UTF-16 with a mark, or
// Windows-1252 when the bytes are not valid UTF-8. Binary files are refused with a message saying what to do.

export const ENCODINGS = {
  utf8: 'UTF-8',
  utf8Bom: 'UTF-8 with byte-order mark',
  utf16le: 'UTF-16 LE',
  utf16be: 'UTF-16 BE',
  windows1252: 'Windows-1252',
} as const;
export type EncodingName = (typeof ENCODINGS)[keyof typeof ENCODINGS];

export type DecodeResult = { ok: true; text: string; encoding: EncodingName } | { ok: false; reason: string };

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

export function decodePriceBytes(bytes: Uint8Array): DecodeResult {
  if (bytes.length === 0) return { ok: false, reason: 'the file is empty' };
  if (startsWith(bytes, 0x50, 0x4b, 0x03, 0x04)) {
    return {
      ok: false,
      reason: 'this is a compressed (zip) file, perhaps a spreadsheet workbook; save the price list as CSV text and import that',
    };
  }
  let text: string;
  let encoding: EncodingName;
  if (startsWith(bytes, 0xef, 0xbb, 0xbf)) {
    const r = tryUtf8(bytes.subarray(3));
    if (r === undefined) return { ok: false, reason: 'the file starts with a UTF-8 byte-order mark but is not valid UTF-8' };
    text = r;
    encoding = ENCODINGS.utf8Bom;
  } else if (startsWith(bytes, 0xff, 0xfe) || startsWith(bytes, 0xfe, 0xff)) {
    const le = bytes[0] === 0xff;
    if ((bytes.length - 2) % 2 !== 0) {
      return { ok: false, reason: `the file is marked as UTF-16 but has an odd number of bytes; it is damaged or not UTF-16` };
    }
    try {
      text = new TextDecoder(le ? 'utf-16le' : 'utf-16be', { fatal: true, ignoreBOM: true }).decode(bytes.subarray(2));
    } catch {
      return { ok: false, reason: `the file is marked as UTF-16 ${le ? 'LE' : 'BE'} but its bytes are not valid UTF-16` };
    }
    encoding = le ? ENCODINGS.utf16le : ENCODINGS.utf16be;
  } else {
    const r = tryUtf8(bytes);
    if (r !== undefined) {
      text = r;
      encoding = ENCODINGS.utf8;
    } else {
      text = decodeWindows1252(bytes);
      encoding = ENCODINGS.windows1252;
    }
  }
  const binary = binaryReason(text);
  if (binary) return { ok: false, reason: binary };
  if (text.trim() === '') return { ok: false, reason: 'the file holds only blank space: no header and no rows' };
  return { ok: true, text, encoding };
}

function tryUtf8(bytes: Uint8Array): string | undefined {
  try {
    return new TextDecoder('utf-8', { fatal: true, ignoreBOM: true }).decode(bytes);
  } catch {
    return undefined;
  }
}
