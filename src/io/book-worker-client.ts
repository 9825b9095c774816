// The page's side of the Book file worker: sends the chosen file, reports which stage it is in, resolves with the
// Book or the problems. The page's thread only receives the finished Book, a large collection in parts of
// RECORDS_PER_PART records (book-worker.ts), each in a task of its own.
import type { Book, CollectionName } from '../domain/book.ts';
import type { BookFileResult } from './book-file.ts';
import type { BookFileStage, BookWorkerMessage, BookWorkerRequest } from './book-worker.ts';

export type { BookFileStage } from './book-worker.ts';

/** The slice of the Worker interface the client uses, so tests can run the worker's code in-process. */
export interface BookWorkerLike {
  onmessage: ((e: MessageEvent<BookWorkerMessage>) => void) | null;
  onerror: ((e: ErrorEvent) => void) | null;
  postMessage(message: BookWorkerRequest): void;
  terminate(): void;
}

function startWorker(): BookWorkerLike {
  return new Worker(new URL('./book-worker.ts', import.meta.url), { type: 'module' }) as unknown as BookWorkerLike;
}

/**
 * Opens a Book file in a Web Worker. Problems in the file are not failures: they come back in the result. Rejects
 * only when the worker itself fails (it could not start, or it stopped), with a message saying so.
 */
export function openBookFileInWorker(
  file: Blob,
  onStage?: (stage: BookFileStage) => void,
  makeWorker: () => BookWorkerLike = startWorker,
): Promise<BookFileResult> {
  return new Promise((resolve, reject) => {
    let worker: BookWorkerLike;
    try {
      worker = makeWorker();
    } catch (e) {
      reject(new Error(`the Book file reader could not start: ${e instanceof Error ? e.message : String(e)}`));
      return;
    }
    /** Records of large collections received ahead of the result, in order. */
    const parts = new Map<CollectionName, unknown[]>();
    worker.onmessage = (e) => {
      const m = e.data;
      if (m.type === 'progress') onStage?.(m.stage);
      else if (m.type === 'records') {
        const list = parts.get(m.collection) ?? [];
        for (const r of m.records) list.push(r);
        parts.set(m.collection, list);
      } else if (m.type === 'result') {
        worker.terminate();
        const r = m.result;
        if (r.ok && m.parted?.length) {
          const book = { ...r.book } as unknown as Record<CollectionName, unknown[]>;
          for (const c of m.parted) book[c] = parts.get(c) ?? [];
          resolve({ ...r, book: book as unknown as Book });
        } else resolve(r);
      } else {
        worker.terminate();
        reject(new Error(m.message));
      }
    };
    worker.onerror = (e) => {
      worker.terminate();
      reject(new Error(`the Book file reader stopped: ${e.message || 'unknown error'}`));
    };
    worker.postMessage({ type: 'open', file });
  });
}
