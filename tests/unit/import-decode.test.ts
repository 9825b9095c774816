// Price file bytes to text: byte-order marks, UTF-16, the Windows-1252 fallback, and refusing binary files.
import { describe, expect, it } from 'vitest';
import { decodePriceBytes, decodeWindows1252, ENCODINGS } from '../../src/io/price-decode.ts';
import { analyse } from './import-helpers.ts';

const CSV = 'MPN,Description,Price\nQT-R10K-06,Résistance 10 kΩ – €,0.05\n';

function utf16(text: string, bigEndian: boolean): Uint8Array {
  const out = new Uint8Array(2 + text.length * 2);
  // Byte-order mark U+FEFF (Unicode Standard §23.8): FF FE little-endian, FE FF big-endian.
  out.set(bigEndian ? [0xfe, 0xff] : [0xff, 0xfe]);
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    out[2 + i * 2] = bigEndian ? c >> 8 : c & 0xff;
    out[3 + i * 2] = bigEndian ? c & 0xff : c >> 8;
  }
  return out;
}

describe('decoding price file bytes', () => {
  it('reads UTF-8 without a byte-order mark', () => {
    const r = decodePriceBytes(new TextEncoder().encode(CSV));
    expect(r).toEqual({ ok: true, text: CSV, encoding: ENCODINGS.utf8 });
  });

  it('drops a UTF-8 byte-order mark (EF BB BF, Unicode Standard §23.8) and says it was there', () => {
    const body = new TextEncoder().encode(CSV);
    const bytes = new Uint8Array([0xef, 0xbb, 0xbf, ...body]);
    const r = decodePriceBytes(bytes);
    expect(r.ok && r.text).toBe(CSV);
    expect(r.ok && r.encoding).toBe(ENCODINGS.utf8Bom);
  });

  it('reads UTF-16 little-endian with its mark', () => {
    const r = decodePriceBytes(utf16(CSV, false));
    expect(r.ok && r.text).toBe(CSV);
    expect(r.ok && r.encoding).toBe(ENCODINGS.utf16le);
  });

  it('reads UTF-16 big-endian with its mark', () => {
    const r = decodePriceBytes(utf16(CSV, true));
    expect(r.ok && r.text).toBe(CSV);
    expect(r.ok && r.encoding).toBe(ENCODINGS.utf16be);
  });

  it('falls back to Windows-1252 when the bytes are not valid UTF-8', () => {
    // "Résistance 0,05 €" in Windows-1252: é = E9, € = 80 (WHATWG Encoding Standard, index-windows-1252).
    const bytes = new Uint8Array([0x52, 0xe9, 0x73, 0x20, 0x30, 0x2c, 0x30, 0x35, 0x20, 0x80]);
    const r = decodePriceBytes(bytes);
    expect(r.ok && r.encoding).toBe(ENCODINGS.windows1252);
    expect(r.ok && r.text).toBe('Rés 0,05 €');
  });

  it('maps the Windows-1252 block 80–9F to the right characters, not to C1 controls', () => {
    // WHATWG index-windows-1252: 0x80 € U+20AC, 0x93 “ U+201C, 0x94 ” U+201D, 0x96 – U+2013, 0x99 ™ U+2122.
    expect(decodeWindows1252(new Uint8Array([0x80, 0x93, 0x94, 0x96, 0x99]))).toBe('\u20ac\u201c\u201d\u2013\u2122');
    // Latin-1 range is identity: 0xE9 é, 0xB5 µ.
    expect(decodeWindows1252(new Uint8Array([0xe9, 0xb5]))).toBe('éµ');
  });

  it('refuses an empty file with a clear message', () => {
    expect(decodePriceBytes(new Uint8Array())).toEqual({ ok: false, reason: 'the file is empty' });
  });

  it('refuses a file of blank space', () => {
    const r = decodePriceBytes(new TextEncoder().encode('  \r\n\r\n \t\n'));
    expect(r.ok).toBe(false);
    expect(!r.ok && r.reason).toMatch(/only blank space/);
  });

  it('refuses a binary file holding NUL bytes', () => {
    const bytes = new Uint8Array(256).map((_, i) => i);
    const r = decodePriceBytes(bytes);
    expect(r.ok).toBe(false);
    expect(!r.ok && r.reason).toMatch(/binary file.*NUL/);
  });

  it('refuses a binary file full of control characters even without NUL', () => {
    const bytes = new Uint8Array(400).map((_, i) => (i % 3 === 0 ? 0x01 + (i % 7) : 0x41));
    const r = decodePriceBytes(bytes);
    expect(!r.ok && r.reason).toMatch(/binary file \(\d+ control characters/);
  });

  it('refuses a zip container (such as a saved workbook) and asks for CSV', () => {
    // Local file header signature 50 4B 03 04 (PKWARE APPNOTE.TXT §4.3.7).
    const r = decodePriceBytes(new Uint8Array([0x50, 0x4b, 0x03, 0x04, 0x14, 0x00, 0x00, 0x00]));
    expect(!r.ok && r.reason).toMatch(/zip.*CSV/);
  });

  it('refuses a UTF-16 file with an odd byte count', () => {
    const r = decodePriceBytes(new Uint8Array([0xff, 0xfe, 0x41, 0x00, 0x42]));
    expect(!r.ok && r.reason).toMatch(/odd number of bytes/);
  });

  it('turns a binary file into one file-level problem and no offers', async () => {
    const a = await analyse(new Uint8Array([0x00, 0x01, 0x02, 0x4d, 0x50, 0x4e]));
    expect(a.readable).toBe(false);
    expect(a.offers).toEqual([]);
    expect(a.problems).toHaveLength(1);
    expect(a.problems[0]).toMatchObject({ row: 0, column: '' });
  });

  it('imports the same quote from UTF-8, UTF-16 and Windows-1252 versions of one file', async () => {
    const text = 'MPN;Description;Price\r\nQT-R10K-06;Résistance;0,05\r\n';
    const cp1252 = new Uint8Array([...text].map((c) => (c === 'é' ? 0xe9 : c.charCodeAt(0))));
    const results = await Promise.all([analyse(text), analyse(utf16(text, false)), analyse(cp1252)]);
    for (const a of results) {
      expect(a.problems).toEqual([]);
      expect(a.offers.map((o) => [o.mpn, o.description, o.breaks])).toEqual([['QT-R10K-06', 'Résistance', [{ qty: 1, price: 0.05 }]]]);
    }
  });
});
