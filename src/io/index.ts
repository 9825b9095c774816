// Public face of io: Book files and supplier price files in and out. One export line per module.
export { serializeBook, parseBookFile, restoreBook, bookFileSizeProblem, bookFileName, BOOK_FILE_EXTENSION, MAX_BOOK_FILE_BYTES } from './book-file.ts';
export type { BookFileProblem, BookFileResult } from './book-file.ts';
