/**
 * Job exchange: the job file (JSON Lines with a SHA-256 digest; version 1 still read), its
 * checks, the merge, the CSV of readings, the demo shop and the review filter. Pure TypeScript for the browser and Node alike:
 * no DOM, no Node APIs; WebCrypto and TextEncoder through globalThis (canonical.ts). The demo
 * shop (demo.ts) runs the engine and is imported on its own, so the app does not load it.
 * The format is documented in docs/exchange-format.md.
 */
export * from './format';
export { canonicalJson, sha256Hex } from './canonical';
export { readJobFile, JobFileReader, formatProblem, formatProblems, digestText, type ReadResult, type FileContent } from './parse';
export { buildJobFile, writeJobFile, joinParts, encodeAsciiLine, selectForExport, ExportError, type BuiltFile, type WriteOptions, type ExportSelection } from './write';
export { pieceDigestHex, PieceHasher, DIGEST_PIECE_BYTES } from './digest';
export { mergePayloads, type MergeSource, type MergeResult, type MergeCounts, type ReadingClash } from './merge';
export { sortPayload } from './order';
export { csvRecords, csvChunks, toCsv, neutraliseFormula, restoreFormula, quoteField, CSV_HEADERS, CSV_NUMERIC_HEADERS, READING_UNITS, type CsvOptions } from './csv';
export { importJobFiles, MemoryImportStore, type ImportStore, type ImportTransaction, type ImportFile, type ImportProgress, type ChunkSource, type FileImportReport, type ImportOptions, type PayloadIds } from './import';
export {
  buildReviewIndex,
  filterJobs,
  jobDate,
  faultsByMonth,
  firstVisitFixRate,
  timeOnJobByTechnician,
  partsUsed,
  assetReadingSeries,
  type ReviewFilter,
  type ReviewIndex,
} from './review';
