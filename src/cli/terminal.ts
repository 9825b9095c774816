// What the CLI writes to a terminal, and how. Text from a Book (names, codes, descriptions) is someone else's and may
// hold control sequences that a terminal would obey — recolouring, moving the cursor, rewriting the title, reordering
// text — so everything the commands print for people passes through here and shows such characters as visible escapes
// (\x1b, \u202e). CSV files are the one exception: they are written as their bytes, the same as the app's download.
import type { CliIo } from './command.ts';

// C0 controls (NUL to US), DEL and C1 controls (U+0080–U+009F, where 0x9B is a one-byte CSI); Unicode bidirectional
// formatting characters (Unicode Standard Annex #9: ALM, LRM, RLM, the embeddings and overrides LRE RLE PDF LRO RLO,
// the isolates LRI RLI FSI PDI); and the line and paragraph separators U+2028 U+2029.
const UNSAFE = /[\u0000-\u001f\u007f-\u009f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069\u2028\u2029]/g;
// The same without tab and line feed, which the commands' own text uses for its layout.
const UNSAFE_BUT_LAYOUT = /[\u0000-\u0008\u000b-\u001f\u007f-\u009f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069\u2028\u2029]/g;

const NAMED: Record<string, string> = { '\t': '\\t', '\n': '\\n', '\r': '\\r' };

function visible(ch: string): string {
  const named = NAMED[ch];
  if (named) return named;
  const code = ch.charCodeAt(0);
  return code <= 0xff ? `\\x${code.toString(16).padStart(2, '0')}` : `\\u${code.toString(16).padStart(4, '0')}`;
}

/**
 * A piece of Book-derived text as a command shows it: every control, separator and bidirectional formatting character,
 * line breaks and tabs included, becomes a visible escape, so a name always stays on its own line and cell.
 */
export function shown(text: string): string {
  return text.replace(UNSAFE, visible);
}

/** A command's whole output made safe for a terminal: as `shown`, but its own line breaks and tabs are kept. */
export function terminalSafe(text: string): string {
  return text.replace(UNSAFE_BUT_LAYOUT, visible);
}

// JSON.stringify escapes C0 controls itself (RFC 8259 §7); DEL, C1 and the bidirectional characters are legal in JSON
// strings, so they are written as \uXXXX escapes, which read back as the same characters.
const JSON_UNSAFE = /[\u007f-\u009f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069\u2028\u2029]/g;

/** JSON for people and programs alike: the same value once parsed, with no character a terminal would obey. */
export function jsonText(value: unknown): string {
  return JSON.stringify(value, null, 2).replace(JSON_UNSAFE, (ch) => `\\u${ch.charCodeAt(0).toString(16).padStart(4, '0')}`);
}

/** The writer the commands are given: `out` and `err` made terminal-safe, `data` passed through byte for byte. */
export function terminalIo(io: CliIo): Required<CliIo> {
  return {
    out: (text) => io.out(terminalSafe(text)),
    err: (text) => io.err(terminalSafe(text)),
    data: (text) => (io.data ?? io.out)(text),
  };
}

let streamsGuarded = false;

/**
 * The process's own streams. A reader that stops early (`rungbook check … | head -3`) closes the pipe, and the next
 * write fails with EPIPE: the command then ends quietly with status 0, as common practice for filters is, instead of
 * dying on an unhandled stream error. A failing stderr is ignored for the same reason.
 */
export function nodeIo(): CliIo {
  if (!streamsGuarded) {
    streamsGuarded = true;
    process.stdout.on('error', (e: NodeJS.ErrnoException) => {
      if (e.code === 'EPIPE') process.exit(0);
      throw e;
    });
    process.stderr.on('error', () => undefined);
  }
  const line = (text: string): string => (text.endsWith('\n') ? text : text + '\n');
  return {
    out: (text) => void process.stdout.write(line(text)),
    err: (text) => void process.stderr.write(line(text)),
    data: (text) => void process.stdout.write(text),
  };
}
