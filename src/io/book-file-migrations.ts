// Numbered steps of the Book file format, like the store's: each brings parsed file data of version `version - 1` to
// `version`. A released step is never edited; a new format is one more step at the end. The steps work on raw JSON
// and leave anything they do not recognise as it is, for the schema to name.
import { isObject } from '../domain/schema.ts';

export interface FileMigration {
  /** File version this step produces; steps are 2, 3… in order (version 1 is the first format). */
  version: number;
  title: string;
  up(raw: Record<string, unknown>): Record<string, unknown>;
}


export const FILE_MIGRATIONS: readonly FileMigration[] = [
  {
    version: 2,
    title: 'price breaks written as [quantity, price] pairs',
    up(raw) {
      const quotes = raw.quotes;
      if (!Array.isArray(quotes)) return { ...raw, version: 2 };
      return {
        ...raw,
        version: 2,
        quotes: quotes.map((q: unknown) => {
          if (!isObject(q) || !Array.isArray(q.breaks)) return q;
          return { ...q, breaks: q.breaks.map((b: unknown) => (isObject(b) && 'qty' in b && 'price' in b ? [b.qty, b.price] : b)) };
        }),
      };
    },
  },
];

/** Problems with a list of steps: it must start at 2 and rise by one. Empty when the list is sound. */
export function fileMigrationProblems(steps: readonly FileMigration[]): string[] {
  return steps.flatMap((s, i) =>
    s.version === i + 2 ? [] : [`file migration step ${i + 1} has version ${s.version}; it must be ${i + 2} (each step one above the last)`],
  );
}

/** Raw file data of version `from` brought step by step to the newest version the steps know. */
export function migrateFile(raw: Record<string, unknown>, from: number, steps: readonly FileMigration[] = FILE_MIGRATIONS): Record<string, unknown> {
  let out = raw;
  for (const step of steps) if (step.version > from) out = step.up(out);
  return out;
}
