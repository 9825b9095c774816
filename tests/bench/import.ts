// Price import figures in Node: the 50,000-row, 4-break sample file read, validated, matched, planned and applied to
// an in-memory Book (importPrices, the CLI's path). The browser path (worker + IndexedDB) is in browser.ts.
import { importPrices } from '../../src/io/price-import.ts';
import { samplePriceFile } from '../fixtures/price-sample.ts';
import type { BenchOptions, BenchSection, Figures } from './harness.ts';
import { median, round } from './stats.ts';

/** The file every import figure uses, in Node and in the browser. */
export const IMPORT_SAMPLE = { rows: 50_000, breaks: 4, seed: 1 } as const;

export const importSection: BenchSection = {
  name: 'import (Node)',
  async run({ quick, log }: BenchOptions): Promise<Figures> {
    const sample = samplePriceFile(IMPORT_SAMPLE);
    const f: Figures = {
      import_file: `${sample.rows} rows × ${sample.breaks} breaks, ${round(sample.bytes.length / 1_048_576, 1)} MB`,
    };
    const times: number[] = [];
    for (let i = 0; i < (quick ? 1 : 3); i++) {
      log(`import: Node run ${i + 1}`);
      const t = performance.now();
      const r = await importPrices(sample.book, sample.bytes, { supplier: sample.supplier, fileName: sample.fileName });
      times.push(performance.now() - t);
      // A run that imported less than the whole file would time less work: refuse to report it.
      if (!r.ok || r.summary.newQuotes !== sample.rows || r.problems.length > 0) {
        throw new Error(`the sample file did not import cleanly (${r.reason ?? `${r.summary.newQuotes} of ${sample.rows} quotes, ${r.problems.length} problems`})`);
      }
      f['import_superseded'] = r.summary.supersededQuotes;
    }
    f['import_node_ms'] = round(median(times));
    return f;
  },
};
