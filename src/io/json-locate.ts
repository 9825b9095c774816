// Where JSON text goes wrong. JSON.parse does not say where in every engine, so on failure this strict scanner
// walks the text once more to find the first bad character (iteratively, so deep nesting cannot overflow).

/** Where and why `text` is not valid JSON, as a sentence naming the line and column. */
export function jsonProblemMessage(text: string): string {
  const { offset, reason, truncated } = jsonErrorAt(text);
  const { line, column } = lineColumn(text, offset);
  const where = `line ${line}, column ${column} (character ${offset + 1})`;
  return truncated
    ? `the file ends too early at ${where}: the JSON is cut off (truncated file?)`
    : `the file is not valid JSON at ${where}: ${reason}`;
}

function lineColumn(text: string, offset: number): { line: number; column: number } {
  let line = 1;
  let lineStart = 0;
  for (let i = text.indexOf('\n'); i >= 0 && i < offset; i = text.indexOf('\n', i + 1)) {
    line++;
    lineStart = i + 1;
  }
  return { line, column: offset - lineStart + 1 };
}

const NUMBER = /-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?/y;
const WS = /[ \t\n\r]*/y;

export function jsonErrorAt(text: string): { offset: number; reason: string; truncated: boolean } {
  let i = 0;
  const stack: string[] = [];
  const n = text.length;
  const skip = (): void => {
    WS.lastIndex = i;
    WS.exec(text);
    i = WS.lastIndex;
  };
  const end = (): { offset: number; reason: string; truncated: boolean } => ({ offset: n, reason: 'unexpected end of text', truncated: true });
  const bad = (reason: string): { offset: number; reason: string; truncated: boolean } => ({ offset: i, reason, truncated: false });
  /** Scans a string starting at the quote at i; returns an error or undefined with i after the closing quote. */
  const string = (): { offset: number; reason: string; truncated: boolean } | undefined => {
    i++;
    for (;;) {
      if (i >= n) return end();
      const c = text.charCodeAt(i);
      if (c === 0x22) {
        i++;
        return undefined;
      }
      if (c < 0x20) return bad('a control character (such as a line break) inside text must be escaped');
      if (c === 0x5c) {
        const e = text[i + 1];
        if (e === undefined) return end();
        if (e === 'u') {
          if (i + 6 > n) return end();
          if (!/^[0-9a-fA-F]{4}$/.test(text.slice(i + 2, i + 6))) return bad('\\u must be followed by four hex digits');
          i += 6;
        } else if ('"\\/bfnrt'.includes(e)) {
          i += 2;
        } else {
          return bad(`\\${e} is not a JSON escape`);
        }
      } else {
        i++;
      }
    }
  };
  type Mode = 'value' | 'after' | 'key';
  let mode: Mode = 'value';
  for (;;) {
    skip();
    if (mode === 'value') {
      if (i >= n) return end();
      const c = text[i]!;
      if (c === '{') {
        stack.push('}');
        i++;
        skip();
        if (text[i] === '}') {
          stack.pop();
          i++;
          mode = 'after';
        } else mode = 'key';
      } else if (c === '[') {
        stack.push(']');
        i++;
        skip();
        if (text[i] === ']') {
          stack.pop();
          i++;
          mode = 'after';
        }
      } else if (c === '"') {
        const e = string();
        if (e) return e;
        mode = 'after';
      } else if (c === '-' || (c >= '0' && c <= '9')) {
        NUMBER.lastIndex = i;
        if (!NUMBER.exec(text)) return i + 1 >= n ? end() : bad('a number is malformed');
        i = NUMBER.lastIndex;
        // A number cut off inside its fraction or exponent ("4.", "4.7e-") is a truncated file, not a bad character.
        if (/^(?:\.|(?:\.\d+)?[eE][+-]?)$/.test(text.slice(i))) return end();
        if (i >= n && stack.length) return end();
        mode = 'after';
      } else {
        const word = ['true', 'false', 'null'].find((w) => w[0] === c);
        if (!word) return bad(`unexpected character ${JSON.stringify(c)} where a value should be`);
        const got = text.slice(i, i + word.length);
        if (got !== word) return word.startsWith(got) && i + got.length >= n ? end() : bad(`expected ${word}`);
        i += word.length;
        mode = 'after';
      }
    } else if (mode === 'key') {
      if (i >= n) return end();
      if (text[i] !== '"') return bad(`expected a property name in double quotes, found ${JSON.stringify(text[i])}`);
      const e = string();
      if (e) return e;
      skip();
      if (i >= n) return end();
      if (text[i] !== ':') return bad(`expected ":" after a property name, found ${JSON.stringify(text[i])}`);
      i++;
      mode = 'value';
    } else {
      if (stack.length === 0) {
        // A complete value was read; anything but whitespace after it is extra.
        return i < n ? bad('unexpected text after the end of the JSON object') : { offset: i, reason: 'unknown problem', truncated: false };
      }
      if (i >= n) return end();
      const close = stack[stack.length - 1]!;
      if (text[i] === ',') {
        i++;
        mode = close === '}' ? 'key' : 'value';
      } else if (text[i] === close) {
        stack.pop();
        i++;
      } else {
        return bad(`expected "," or "${close}", found ${JSON.stringify(text[i])}`);
      }
    }
  }
}
