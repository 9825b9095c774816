// Reads the text of a PDF that Chromium printed, page by page, without any font or outside tool: streams are
// inflated with node:zlib and each font's glyph codes are mapped to Unicode through its ToUnicode CMap (PDF 1.7,
// ISO 32000-1 §9.10.3). Anything this reader does not understand throws, so a test never passes on missing text.
import { inflateSync } from 'node:zlib';

interface PdfObject {
  dict: string;
  /** Raw stream bytes, when the object has a stream. */
  stream?: Buffer;
}

function objects(pdf: Buffer): Map<number, PdfObject> {
  const text = pdf.toString('latin1');
  const out = new Map<number, PdfObject>();
  const re = /(\d+) 0 obj\b/g;
  for (let m = re.exec(text); m; m = re.exec(text)) {
    const start = m.index + m[0].length;
    const end = text.indexOf('endobj', start);
    if (end < 0) throw new Error(`object ${m[1]} has no endobj`);
    const body = text.slice(start, end);
    const s = body.search(/\bstream(\r\n|\n)/);
    if (s < 0) {
      out.set(Number(m[1]), { dict: body });
      continue;
    }
    const dict = body.slice(0, s);
    const eol = body.slice(s + 6, s + 8) === '\r\n' ? 2 : 1;
    const dataStart = start + s + 6 + eol;
    const len = /\/Length (\d+)(?!\s+\d+\s+R)/.exec(dict);
    const dataEnd = len ? dataStart + Number(len[1]) : text.indexOf('endstream', dataStart);
    out.set(Number(m[1]), { dict, stream: pdf.subarray(dataStart, dataEnd) });
    re.lastIndex = end;
  }
  return out;
}

function streamText(o: PdfObject | undefined, what: string): string {
  if (!o?.stream) throw new Error(`${what} has no stream`);
  if (/\/Filter\s*\/FlateDecode/.test(o.dict)) return inflateSync(o.stream).toString('latin1');
  if (/\/Filter/.test(o.dict)) throw new Error(`${what} uses a filter this reader does not know: ${o.dict}`);
  return o.stream.toString('latin1');
}

function hexToUnicode(hex: string): string {
  let s = '';
  for (let i = 0; i + 4 <= hex.length; i += 4) s += String.fromCharCode(parseInt(hex.slice(i, i + 4), 16));
  return s;
}

interface CMap {
  bytes: number;
  map: Map<number, string>;
}

function parseCMap(text: string): CMap {
  const space = /begincodespacerange\s*<([0-9A-Fa-f]+)>/.exec(text);
  if (!space) throw new Error('a ToUnicode CMap has no code space range');
  const map = new Map<number, string>();
  for (const block of text.matchAll(/beginbfchar([\s\S]*?)endbfchar/g)) {
    for (const m of block[1]!.matchAll(/<([0-9A-Fa-f]+)>\s*<([0-9A-Fa-f]+)>/g)) map.set(parseInt(m[1]!, 16), hexToUnicode(m[2]!));
  }
  for (const block of text.matchAll(/beginbfrange([\s\S]*?)endbfrange/g)) {
    for (const m of block[1]!.matchAll(/<([0-9A-Fa-f]+)>\s*<([0-9A-Fa-f]+)>\s*(<[0-9A-Fa-f]+>|\[[^\]]*\])/g)) {
      const lo = parseInt(m[1]!, 16);
      const hi = parseInt(m[2]!, 16);
      const dst = m[3]!;
      if (dst.startsWith('[')) {
        const items = [...dst.matchAll(/<([0-9A-Fa-f]+)>/g)].map((x) => hexToUnicode(x[1]!));
        for (let c = lo; c <= hi; c++) map.set(c, items[c - lo] ?? '');
      } else {
        const base = hexToUnicode(dst.slice(1, -1));
        const last = base.charCodeAt(base.length - 1);
        for (let c = lo; c <= hi; c++) map.set(c, base.slice(0, -1) + String.fromCharCode(last + (c - lo)));
      }
    }
  }
  return { bytes: space[1]!.length / 2, map };
}

function decode(hex: string, cmap: CMap): string {
  const step = cmap.bytes * 2;
  let s = '';
  for (let i = 0; i + step <= hex.length; i += step) {
    const code = parseInt(hex.slice(i, i + step), 16);
    const u = cmap.map.get(code);
    if (u === undefined) throw new Error(`glyph code ${code} has no Unicode mapping`);
    s += u;
  }
  return s;
}

/**
 * Each page's text: runs of one text object joined, text objects separated by a space, spaces collapsed, and NFKC
 * applied (so a ligature glyph reads as its letters).
 */
export function pdfPageTexts(pdf: Buffer): string[] {
  if (pdf.subarray(0, 5).toString('latin1') !== '%PDF-') throw new Error('not a PDF');
  const objs = objects(pdf);
  const pagesObj = [...objs.values()].find((o) => /\/Type\s*\/Pages\b/.test(o.dict));
  if (!pagesObj) throw new Error('no page tree');
  const kids = /\/Kids\s*\[([^\]]*)\]/.exec(pagesObj.dict);
  if (!kids) throw new Error('the page tree lists no pages');
  const pageIds = [...kids[1]!.matchAll(/(\d+) 0 R/g)].map((m) => Number(m[1]));
  const cmaps = new Map<number, CMap>();
  return pageIds.map((id) => {
    const page = objs.get(id);
    if (!page || !/\/Type\s*\/Page\b/.test(page.dict)) throw new Error(`page ${id} is not a page (nested page trees are not read)`);
    const fontDict = /\/Font\s*<<([\s\S]*?)>>/.exec(page.dict);
    const fonts = new Map<string, CMap>();
    for (const m of fontDict?.[1]!.matchAll(/\/(\S+?)\s+(\d+) 0 R/g) ?? []) {
      const fontId = Number(m[2]);
      const font = objs.get(fontId);
      const tu = font && /\/ToUnicode\s+(\d+) 0 R/.exec(font.dict);
      if (!tu) continue;
      const cmapId = Number(tu[1]);
      if (!cmaps.has(cmapId)) cmaps.set(cmapId, parseCMap(streamText(objs.get(cmapId), `CMap ${cmapId}`)));
      fonts.set(m[1]!, cmaps.get(cmapId)!);
    }
    const contents = /\/Contents\s+(\d+) 0 R/.exec(page.dict);
    if (!contents) throw new Error(`page ${id} has no single content stream`);
    const ops = streamText(objs.get(Number(contents[1])), `content of page ${id}`);
    const pieces: string[] = [];
    for (const bt of ops.matchAll(/\bBT\b([\s\S]*?)\bET\b/g)) {
      let font: CMap | undefined;
      let text = '';
      for (const t of bt[1]!.matchAll(/\/(\S+)\s+[\d.]+\s+Tf|<([0-9A-Fa-f]*)>\s*Tj|\[([^\]]*)\]\s*TJ/g)) {
        if (t[1] !== undefined) {
          font = fonts.get(t[1]);
          if (!font) throw new Error(`font ${t[1]} on page ${id} has no ToUnicode map`);
        } else if (t[2] !== undefined) {
          if (!font) throw new Error('text shown before a font was set');
          text += decode(t[2], font);
        } else if (t[3] !== undefined) {
          if (!font) throw new Error('text shown before a font was set');
          for (const h of t[3].matchAll(/<([0-9A-Fa-f]*)>/g)) text += decode(h[1]!, font);
        }
      }
      pieces.push(text);
    }
    return pieces.join(' ').normalize('NFKC').replace(/\s+/g, ' ').trim();
  });
}
