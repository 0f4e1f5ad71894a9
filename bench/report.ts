/**
 * The benchmark's building blocks: a section measures one thing and returns a table and a JSON
 * summary; bench/run.ts prints the tables in order and one final JSON line with every summary.
 * To add a measurement (diagnosis timings, bundle size, ...) write a `BenchSection` in its own
 * file and list it in bench/run.ts.
 */

/** A plain table: header cells and rows of cells (numbers are printed as given). */
export interface BenchTable {
  columns: string[];
  rows: (string | number)[][];
}

/** What a section hands back. */
export interface SectionResult {
  table?: BenchTable;
  /** Lines printed under the table. */
  notes?: string[];
  /** The section's summary in the final JSON line, under the section's key. */
  json: unknown;
}

/** Shared between sections: what earlier sections returned, and the command-line flags. */
export interface BenchContext {
  /** JSON summaries of the sections already run, by key. */
  results: Map<string, unknown>;
  /** Command-line flags, e.g. "--skip-ngspice" → flags.has("skip-ngspice"). */
  flags: Map<string, string>;
}

export interface BenchSection {
  /** Key of this section in the final JSON line. */
  key: string;
  /** Heading printed above the table. */
  title: string;
  run(context: BenchContext): SectionResult | Promise<SectionResult>;
}

/** Formats a table with columns padded to their widest cell; numbers right-aligned. */
export function formatTable(table: BenchTable): string {
  const cells = [table.columns, ...table.rows.map((r) => r.map(String))];
  const widths = table.columns.map((_, j) => Math.max(...cells.map((r) => (r[j] ?? '').length)));
  const numeric = table.columns.map((_, j) => table.rows.length > 0 && table.rows.every((r) => typeof r[j] === 'number'));
  const line = (r: string[]): string =>
    r.map((c, j) => (numeric[j] || j > 0 ? c.padStart(widths[j]!) : c.padEnd(widths[j]!))).join('  ');
  const head = line(table.columns);
  return [head, '-'.repeat(head.length), ...cells.slice(1).map(line)].join('\n');
}

/** Median of a non-empty list. */
export function median(values: readonly number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const mid = s.length >> 1;
  return s.length % 2 ? s[mid]! : (s[mid - 1]! + s[mid]!) / 2;
}

/** Geometric mean of positive numbers. */
export function geometricMean(values: readonly number[]): number {
  return Math.exp(values.reduce((a, v) => a + Math.log(v), 0) / values.length);
}

/** Rounds to `digits` significant digits for display and JSON. */
export function sig(value: number, digits = 3): number {
  return Number.isFinite(value) && value !== 0 ? Number(value.toPrecision(digits)) : value;
}
