// The figures of the demo Book for a browser's first start, shown with its first table while the figures worker is
// still loading its formula engine. `vite build` runs this (vite.config.ts) and ships its output as
// kept-demo-figures.json; they are keyed like figures kept between starts (src/ui/figures-keep.ts), so the app uses
// them only for that very Book and build, and the worker's answer replaces them a moment later.
// usage: node --import tsx scripts/kept-demo-figures.ts ENGINE-BUILD   (prints the JSON on stdout)
import { pathToFileURL } from 'node:url';
import { loadBuiltInChecks } from '../src/cli/check-sheets-fs.ts';
import { demoBook } from '../src/domain/demo-book.ts';
import { addBuiltInChecks } from '../src/engine/check-sheets.ts';
import { LiveFigures } from '../src/engine/figures.ts';
import { inVariantOrder } from '../src/domain/variant-order.ts';
import { asStored } from '../src/store/idb-store.ts';
import { figuresKey, keptJson } from '../src/ui/figures-keep.ts';
import type { ShippedFigures } from '../src/ui/figures-keep.ts';

/**
 * The demo Book as a first start writes it and the app holds it: with the built-in checks, each collection in id
 * order as stored, the variants in the order the app shows them.
 */
export function firstStartBook(): ReturnType<typeof demoBook> {
  return inVariantOrder(asStored(addBuiltInChecks(demoBook(), loadBuiltInChecks())));
}

/** The demo Book's figures, as the figures worker answers them, with their key for engine build `engine`. */
export async function keptDemoFigures(engine: string): Promise<ShippedFigures> {
  const book = firstStartBook();
  const live = new LiveFigures();
  try {
    const update = live.update(book);
    if (update.costingError !== undefined || update.familyError !== undefined) {
      throw new Error(`the demo Book's figures could not be worked out: ${update.costingError ?? update.familyError}`);
    }
    const key = await figuresKey(book, engine);
    if (key === undefined) throw new Error('the demo Book is too large to key its figures');
    return { key, update };
  } finally {
    live.close();
  }
}

if (process.argv[1] !== undefined && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const engine = process.argv[2];
  if (!engine) throw new Error('usage: kept-demo-figures.ts ENGINE-BUILD');
  process.stdout.write(keptJson(await keptDemoFigures(engine)));
}
