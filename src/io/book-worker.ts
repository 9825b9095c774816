// Web Worker entry for opening a Book file off the page's thread: reading the file, JSON.parse and validation of a
// large Book take seconds, and the page must keep drawing and answering meanwhile. It returns the Book (copied to
// the page by structured clone, a large collection in parts so that no one copy holds the page) or the problems. The UI starts it with openBookFileInWorker (book-worker-client.ts).
import { bookFromBytes } from './book-bytes.ts';
import { bookFileSizeProblem } from './book-file.ts';
import type { BookFileResult } from './book-file.ts';
import { COLLECTIONS } from '../domain/book.ts';
import type { Book, CollectionName } from '../domain/book.ts';

export interface BookWorkerRequest {
  type: 'open';
  /** The chosen file (a File is a Blob); read here, so the page never holds its text. */
  file: Blob;
}

export type BookFileStage = 'reading' | 'checking';

export type BookWorkerMessage =
  | { type: 'progress'; stage: BookFileStage; bytes: number }
  /** Records of a large collection, sent ahead of the result in parts (see sendInParts). */
  | { type: 'records'; collection: CollectionName; records: unknown[] }
  /** The result; `parted` names the collections whose records came ahead in parts (empty in `result`). */
  | { type: 'result'; result: BookFileResult; parted?: CollectionName[] }
  | { type: 'error'; message: string };

/** Records per message of a large collection: each part takes the page a few ms to receive. */
export const RECORDS_PER_PART = 4000;

/**
 * Posts a Book file's result so that the page never takes one long copy: the records of each collection larger than
 * RECORDS_PER_PART go ahead in parts (one message, and so one task of the page's, each), then the result without them.
 */
export function postResult(result: BookFileResult, post: (m: BookWorkerMessage) => void): void {
  if (!result.ok) {
    post({ type: 'result', result });
    return;
  }
  const parted: CollectionName[] = [];
  const book: Book = { ...result.book };
  for (const c of COLLECTIONS) {
    const list: readonly unknown[] = result.book[c];
    if (list.length <= RECORDS_PER_PART) continue;
    for (let i = 0; i < list.length; i += RECORDS_PER_PART) post({ type: 'records', collection: c, records: list.slice(i, i + RECORDS_PER_PART) });
    (book as unknown as Record<CollectionName, unknown[]>)[c] = [];
    parted.push(c);
  }
  post(parted.length ? { type: 'result', result: { ...result, book }, parted } : { type: 'result', result });
}

/**
 * Reads a Book file's bytes as a Book: the size first (nothing is read beyond the limit), then the bytes strictly as
 * UTF-8 and the text through the Book file parser, exactly as the command line reads a file (io/book-bytes.ts): bytes
 * that are not UTF-8 are refused, never replaced. Never throws; Node (tests, bench) runs exactly what the worker runs.
 */
export async function readBookFileBlob(file: Blob, onStage?: (stage: BookFileStage) => void): Promise<BookFileResult> {
  const tooBig = bookFileSizeProblem(file.size);
  if (tooBig) return { ok: false, problems: [tooBig], total: 1 };
  onStage?.('reading');
  let bytes: Uint8Array;
  try {
    bytes = new Uint8Array(await file.arrayBuffer());
  } catch (e) {
    return { ok: false, problems: [{ path: '', message: `the file could not be read: ${e instanceof Error ? e.message : String(e)}` }], total: 1 };
  }
  onStage?.('checking');
  return bookFromBytes(bytes);
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
    postResult(result, post);
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
