// The worker's job run in Node (the same code the browser worker runs), the page-side client driven through an
// in-process stand-in for Worker, and the benchmark's sample price file importing cleanly.
import { describe, expect, it } from 'vitest';
import { OFFERS_PER_PART, handlePriceWorkerRequest } from '../../src/io/price-worker.ts';
import { analysePriceFile } from '../../src/io/price-validate.ts';
import type { PriceWorkerMessage, PriceWorkerRequest } from '../../src/io/price-worker.ts';
import { runPriceImportInWorker } from '../../src/io/price-worker-client.ts';
import type { PriceWorkerLike } from '../../src/io/price-worker-client.ts';
import { samplePriceFile } from '../fixtures/price-sample.ts';
import { importPrices } from '../../src/io/price-import.ts';
import { BASE_OPTIONS, bytesOf } from './import-helpers.ts';

function manyRows(n: number): Uint8Array {
  const lines = ['MPN,Qty,Price'];
  for (let i = 0; i < n; i++) lines.push(`QT-W${i},1,0.05`);
  return bytesOf(lines.join('\n'));
}

/** Runs the worker's handler on the next turn, as a real worker would, and hands messages back asynchronously. */
class InProcessWorker implements PriceWorkerLike {
  onmessage: ((e: MessageEvent<PriceWorkerMessage>) => void) | null = null;
  onerror: ((e: ErrorEvent) => void) | null = null;
  terminated = false;
  postMessage(message: PriceWorkerRequest): void {
    setTimeout(() => {
      void handlePriceWorkerRequest(structuredClone(message), (m) => {
        if (!this.terminated) this.onmessage?.({ data: structuredClone(m) } as MessageEvent<PriceWorkerMessage>);
      });
    }, 0);
  }
  terminate(): void {
    this.terminated = true;
  }
}

describe('price reader worker', () => {
  it('posts progress with rows and rows per second, then the analysis', async () => {
    const messages: PriceWorkerMessage[] = [];
    await handlePriceWorkerRequest({ type: 'analyse', bytes: manyRows(5000), options: BASE_OPTIONS }, (m) => messages.push(m));
    const progress = messages.filter((m) => m.type === 'progress');
    expect(progress.length).toBeGreaterThanOrEqual(2);
    expect(progress.map((m) => m.type === 'progress' && m.rows)).toEqual([2000, 4000, 5000]);
    for (const m of progress) expect(m.type === 'progress' && m.rowsPerSecond).toBeGreaterThanOrEqual(0);
    // A large file's offers go ahead in parts of OFFERS_PER_PART, so no one copy holds the page; the result follows.
    const parts = messages.filter((m) => m.type === 'offers');
    expect(parts.map((m) => m.type === 'offers' && m.count)).toEqual([OFFERS_PER_PART, 5000 - OFFERS_PER_PART]);
    const last = messages.at(-1)!;
    expect(last.type === 'result' && last.parted).toBe(true);
    expect(last.type === 'result' && last.analysis.offers).toEqual([]);
    const whole = await analysePriceFile(manyRows(5000), BASE_OPTIONS);
    // Each part is JSON text of its offers: read back, they are the analysis' offers exactly.
    expect(parts.flatMap((m) => (m.type === 'offers' ? (JSON.parse(m.json) as unknown[]) : []))).toEqual(whole.offers);
  });

  it('sends a small file’s analysis whole', async () => {
    const messages: PriceWorkerMessage[] = [];
    await handlePriceWorkerRequest({ type: 'analyse', bytes: manyRows(OFFERS_PER_PART), options: BASE_OPTIONS }, (m) => messages.push(m));
    expect(messages.some((m) => m.type === 'offers')).toBe(false);
    const last = messages.at(-1)!;
    expect(last.type === 'result' && last.analysis.offers).toHaveLength(OFFERS_PER_PART);
  });

  it('answers a malformed request with an error message, not a crash', async () => {
    const messages: PriceWorkerMessage[] = [];
    await handlePriceWorkerRequest({ type: 'analyse', bytes: 'text' as unknown as Uint8Array, options: BASE_OPTIONS }, (m) => messages.push(m));
    expect(messages).toEqual([{ type: 'error', message: expect.stringMatching(/other than file bytes/) }]);
  });

  it('the client resolves with the analysis and relays progress', async () => {
    const seen: number[] = [];
    const worker = new InProcessWorker();
    const analysis = await runPriceImportInWorker(manyRows(4500), BASE_OPTIONS, (p) => seen.push(p.rows), undefined, () => worker);
    // The offers came in parts and are put back together: the very analysis read in one piece.
    expect(analysis).toEqual(await analysePriceFile(manyRows(4500), BASE_OPTIONS));
    expect(seen).toEqual([2000, 4000, 4500]);
    expect(worker.terminated).toBe(true);
  });

  it('the client stops the worker and rejects when aborted', async () => {
    const worker = new InProcessWorker();
    const ctrl = new AbortController();
    const p = runPriceImportInWorker(manyRows(10), BASE_OPTIONS, undefined, ctrl.signal, () => worker);
    ctrl.abort();
    await expect(p).rejects.toMatchObject({ name: 'AbortError' });
    expect(worker.terminated).toBe(true);
  });

  it('the client rejects a part whose offers are not as many as it announces', async () => {
    const worker: PriceWorkerLike = {
      onmessage: null,
      onerror: null,
      postMessage() {
        setTimeout(() => this.onmessage?.({ data: { type: 'offers', count: 2, json: '[]' } } as MessageEvent<PriceWorkerMessage>), 0);
      },
      terminate() {},
    };
    await expect(runPriceImportInWorker(manyRows(10), BASE_OPTIONS, undefined, undefined, () => worker)).rejects.toThrow(/sent 0 offers where it announced 2/);
  });

  it('file problems come back in the analysis rather than as a failure', async () => {
    const analysis = await runPriceImportInWorker(bytesOf('MPN,Price\nQT-1,abc\n'), BASE_OPTIONS, undefined, undefined, () => new InProcessWorker());
    expect(analysis.problems).toHaveLength(1);
  });
});

describe('benchmark sample price file', () => {
  it('is deterministic and imports every row with its breaks', async () => {
    const a = samplePriceFile({ rows: 2000, breaks: 4, seed: 7 });
    const b = samplePriceFile({ rows: 2000, breaks: 4, seed: 7 });
    expect(Buffer.from(a.bytes).equals(Buffer.from(b.bytes))).toBe(true);
    const r = await importPrices(a.book, a.bytes, { supplier: a.supplier, fileName: a.fileName });
    expect(r.problems).toEqual([]);
    expect(r.ok).toBe(true);
    expect(r.summary.newQuotes).toBe(2000);
    expect(r.summary.supersededQuotes).toBe(a.book.quotes.length);
    const fresh = r.book!.quotes.filter((q) => q.batchId === r.summary.batchId);
    expect(fresh.every((q) => q.breaks.length === 4)).toBe(true);
  });
});
