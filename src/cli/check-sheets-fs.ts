// Reads the built-in check sheets (sheets/*.checks) from disk, for the CLI and the Node tests. The browser build
// reads the same files through the bundler instead.
import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Check } from '../domain/book.ts';
import { builtInChecks } from '../engine/check-sheets.ts';

/** The sheets/ folder of this checkout or install. */
export const SHEETS_DIR = resolve(dirname(fileURLToPath(import.meta.url)), '../../sheets');

/** File name → text of every `.checks` file in the folder. */
export function readSheetTexts(dir: string = SHEETS_DIR): Record<string, string> {
  const texts: Record<string, string> = {};
  for (const name of readdirSync(dir).filter((n) => n.endsWith('.checks')).sort()) {
    texts[name] = readFileSync(join(dir, name), 'utf8');
  }
  return texts;
}

/** The built-in checks as Check records (throws, with line numbers, if a shipped sheet is broken). */
export function loadBuiltInChecks(dir: string = SHEETS_DIR): Check[] {
  return builtInChecks(readSheetTexts(dir));
}
