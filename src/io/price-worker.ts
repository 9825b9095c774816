// Web Worker entry for reading and checking a price file off the page's thread, so the page stays responsive and can
// show rows and rows/s. The UI starts it with runPriceImportInWorker (price-worker-client.ts).
import { analysePriceFile } from './price-validate.ts';
import type { AnalyseOptions, PriceAnalysis } from './price-validate.ts';

export interface PriceWorkerRequest {
  type: 'analyse';
  bytes: Uint8Array;
  options: AnalyseOptions;
}

export type PriceWorkerMessage =
  | { type: 'progress'; rows: number; rowsPerSecond: number }
  /**
   * Offers of a large file, sent ahead of the result in parts (see OFFERS_PER_PART), each part as JSON text: the
   * page takes one string and parses it far faster than it takes apart a copy of thousands of small objects.
   */
  | { type: 'offers'; count: number; json: string }
  /** The analysis; when `parted`, its offers came ahead in parts and it carries none. */
  | { type: 'result'; analysis: PriceAnalysis; parted?: boolean }
  | { type: 'error'; message: string };

/**
 * Offers per message of a large file: the page receives and parses each message in a task of its own, and a copy of
 * 50,000 offers at once held it for a few hundred ms.
 */
export const OFFERS_PER_PART = 4000;

/** The worker's whole job, as a plain function so Node tests run exactly what the worker runs. */
export async function handlePriceWorkerRequest(request: PriceWorkerRequest, post: (m: PriceWorkerMessage) => void): Promise<void> {
  if (request?.type !== 'analyse' || !(request.bytes instanceof Uint8Array)) {
    post({ type: 'error', message: 'the price reader was sent something other than file bytes' });
    return;
  }
  const started = performance.now();
  try {
    const analysis = await analysePriceFile(request.bytes, request.options, (rows) => {
      const seconds = (performance.now() - started) / 1000;
      post({ type: 'progress', rows, rowsPerSecond: seconds > 0 ? Math.round(rows / seconds) : 0 });
    });
    const offers = analysis.offers;
    if (offers.length <= OFFERS_PER_PART) {
      post({ type: 'result', analysis });
      return;
    }
    for (let i = 0; i < offers.length; i += OFFERS_PER_PART) {
      const part = offers.slice(i, i + OFFERS_PER_PART);
      post({ type: 'offers', count: part.length, json: JSON.stringify(part) });
    }
    post({ type: 'result', analysis: { ...analysis, offers: [] }, parted: true });
  } catch (e) {
    post({ type: 'error', message: `the price file could not be read: ${e instanceof Error ? e.message : String(e)}` });
  }
}

// Only inside a dedicated worker: a page or Node importing this module for its types must not grab onmessage.
const scope = globalThis as unknown as { WorkerGlobalScope?: unknown; onmessage: unknown; postMessage(m: unknown): void };
if (typeof scope.WorkerGlobalScope !== 'undefined') {
  scope.onmessage = (e: MessageEvent<PriceWorkerRequest>) => {
    void handlePriceWorkerRequest(e.data, (m) => scope.postMessage(m));
  };
}
