// The page's side of the price reader worker: sends the file bytes, reports progress, resolves with the analysis.
import type { AnalyseOptions, PriceAnalysis } from './price-validate.ts';
import type { PriceWorkerMessage, PriceWorkerRequest } from './price-worker.ts';

export interface PriceProgress {
  rows: number;
  rowsPerSecond: number;
}

/** The slice of the Worker interface the client uses, so tests can run the worker's code in-process. */
export interface PriceWorkerLike {
  onmessage: ((e: MessageEvent<PriceWorkerMessage>) => void) | null;
  onerror: ((e: ErrorEvent) => void) | null;
  postMessage(message: PriceWorkerRequest): void;
  terminate(): void;
}

function startWorker(): PriceWorkerLike {
  return new Worker(new URL('./price-worker.ts', import.meta.url), { type: 'module' }) as unknown as PriceWorkerLike;
}

/**
 * Reads and checks a price file in a Web Worker. Rejects on abort (the worker is stopped) or when the worker fails;
 * problems inside the file are not failures: they come back in the analysis.
 */
export function runPriceImportInWorker(
  bytes: Uint8Array,
  options: AnalyseOptions,
  onProgress?: (p: PriceProgress) => void,
  signal?: AbortSignal,
  makeWorker: () => PriceWorkerLike = startWorker,
): Promise<PriceAnalysis> {
  return new Promise((resolve, reject) => {
    if (signal?.aborted) {
      reject(new DOMException('price import cancelled', 'AbortError'));
      return;
    }
    const worker = makeWorker();
    const stop = (): void => {
      worker.terminate();
      signal?.removeEventListener('abort', onAbort);
    };
    const onAbort = (): void => {
      stop();
      reject(new DOMException('price import cancelled', 'AbortError'));
    };
    signal?.addEventListener('abort', onAbort, { once: true });
    const offers: PriceAnalysis['offers'] = [];
    worker.onmessage = (e) => {
      const m = e.data;
      if (m.type === 'progress') onProgress?.({ rows: m.rows, rowsPerSecond: m.rowsPerSecond });
      else if (m.type === 'offers') {
        // Offers are plain text, numbers and lists of breaks, so JSON gives each back exactly as the worker read it.
        const part = JSON.parse(m.json) as PriceAnalysis['offers'];
        if (part.length !== m.count) {
          stop();
          reject(new Error(`the price reader sent ${part.length} offers where it announced ${m.count}`));
          return;
        }
        for (const o of part) offers.push(o);
      } else if (m.type === 'result') {
        stop();
        resolve(m.parted ? { ...m.analysis, offers } : m.analysis);
      } else {
        stop();
        reject(new Error(m.message));
      }
    };
    worker.onerror = (e) => {
      stop();
      reject(new Error(`the price reader stopped: ${e.message || 'unknown error'}`));
    };
    worker.postMessage({ type: 'analyse', bytes, options });
  });
}
