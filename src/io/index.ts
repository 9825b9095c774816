// Public face of io: Book files and supplier price files in and out. One export line per module.
export { serializeBook, parseBookFile, restoreBook, bookFileSizeProblem, bookFileName, BOOK_FILE_EXTENSION, MAX_BOOK_FILE_BYTES } from './book-file.ts';
export type { BookFileProblem, BookFileResult } from './book-file.ts';
export { decodePriceBytes } from './price-decode.ts';
export { readPriceTable } from './price-read.ts';
export { guessField, parseColumnMapping, resolveMapping, PRICE_FIELDS } from './price-map.ts';
export type { PriceField, PriceProblem, PriceUnit, Decimal, DateOrder } from './price-map.ts';
export { analysePriceFile, sha256Hex } from './price-validate.ts';
export type { AnalyseOptions, PriceAnalysis, PriceOffer } from './price-validate.ts';
export { planImport, UNMATCHED_DECISIONS } from './price-plan.ts';
export type { ImportPlan, PlanOptions, UnmatchedOffer, UnmatchedDecision } from './price-plan.ts';
export { importPrices, findSupplier, knownCurrencies } from './price-import.ts';
export type { ImportPricesOptions, ImportPricesResult, ImportSummary } from './price-import.ts';
export { runPriceImportInWorker } from './price-worker-client.ts';
export type { PriceProgress } from './price-worker-client.ts';
export { samplePriceFile } from './price-sample.ts';
export { exportText, exportField, exportBytes, parseExportOptions, DELIMITERS, DECIMAL_STYLES } from './csv-write.ts';
export type { ExportCell, ExportOptions } from './csv-write.ts';
