// The built-in check sheets (the text files in sheets/), bundled into the app at build time and added to every
// new Book.
import type { Book } from '../domain/book.ts';
import { addBuiltInChecks, builtInChecks } from '../engine/check-sheets.ts';

/** File path from the project root (for example "/sheets/supply.checks") → file text. */
export const SHEET_FILES: Record<string, string> = import.meta.glob<string>('/sheets/**/*', {
  query: '?raw',
  import: 'default',
  eager: true,
});

/** The check sheets among the sheet files. */
export function checkSheetTexts(files: Record<string, string> = SHEET_FILES): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [path, text] of Object.entries(files)) if (path.endsWith('.checks')) out[path] = text;
  return out;
}

/**
 * A copy of the Book with the built-in checks it lacks. The sheets ship with the program, so a problem in one is
 * a defect and throws (the shell shows it) rather than quietly starting a Book without checks.
 */
export function withBuiltInChecks(book: Book): Book {
  return addBuiltInChecks(book, builtInChecks(checkSheetTexts()));
}
