// Web Worker entry for opening a Book file off the page's thread: reading the file, JSON.parse and validation of a
// large Book take seconds, and the page must keep drawing and answering meanwhile. It returns the Book (copied to
// the page by structured clone) or the problems. The UI starts it with openBookFileInWorker (book-worker-client.ts).
import { bookFileSizeProblem, parseBookFile } from './book-file.ts';
import type { BookFileResult } from './book-file.ts';

export interface BookWorkerRequest {
  type: 'open';
  /** The chosen file (a File is a Blob); read here, so the page never holds its text. */
  file: Blob;
}

export type BookFileStage = 'reading' | 'checking';

export type BookWorkerMessage =
  | { type: 'progress'; stage: BookFileStage; bytes: number }
  | { type: 'result'; result: BookFileResult }
  | { type: 'error'; message: string };

/**
 * Reads a Book file's bytes as a Book: the size first (nothing is read beyond the limit), then the text through
 * parseBookFile. Never throws; Node (tests, bench) runs exactly what the worker runs.
 */
export async function readBookFileBlob(file: Blob, onStage?: (stage: BookFileStage) => void): Promise<BookFileResult> {
  const tooBig = bookFileSizeProblem(file.size);
  if (tooBig) return { ok: false, problems: [tooBig], total: 1 };
  onStage?.('reading');
  let text: string;
  try {
    text = await file.text();
  } catch (e) {
    return { ok: false, problems: [{ path: '', message: `the file could not be read: ${e instanceof Error ? e.message : String(e)}` }], total: 1 };
  }
  onStage?.('checking');
  return parseBookFile(text);
}

/** The worker's whole job, as a plain function so Node tests run exactly what the worker runs. */
export async function handleBookWorkerRequest(request: BookWorkerRequest, post: (m: BookWorkerMessage) => void): Promise<void> {
  if (request?.type !== 'open' || !(request.file instanceof Blob)) {
    post({ type: 'error', message: 'the Book file reader was sent something other than a file' });
    return;
  }
  const bytes = request.file.size;
  try {
    const result = await readBookFileBlob(request.file, (stage) => post({ type: 'progress', stage, bytes }));
    post({ type: 'result', result });
  } catch (e) {
    post({ type: 'error', message: `the Book file could not be read: ${e instanceof Error ? e.message : String(e)}` });
  }
}

// Only inside a dedicated worker: a page or Node importing this module for its types must not grab onmessage.
const scope = globalThis as unknown as { WorkerGlobalScope?: unknown; onmessage: unknown; postMessage(m: unknown): void };
if (typeof scope.WorkerGlobalScope !== 'undefined') {
  scope.onmessage = (e: MessageEvent<BookWorkerRequest>) => {
    void handleBookWorkerRequest(e.data, (m) => scope.postMessage(m));
  };
}
