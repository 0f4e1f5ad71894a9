/**
 * The benchmark: `npx tsx bench/run.ts [--seconds=0.3] [--skip-ngspice] [--only=KEY,KEY]` (npm run
 * bench). `--only` runs the sections with those keys (engineSolve, ngspiceTransient, diagnosis,
 * exchange, appBudget).
 * Prints one table per section, then a final line of JSON with every section's summary.
 * Add a section: write a `BenchSection` (bench/report.ts) and list it here.
 */
import { appBudgetSection } from './app-budget';
import { diagnosisSection } from './diagnosis';
import { engineSolveSection } from './engine-solve';
import { exchangeSection } from './exchange';
import { ngspiceTransientSection } from './ngspice-transient';
import { formatTable, type BenchContext, type BenchSection } from './report';

const SECTIONS: BenchSection[] = [engineSolveSection, ngspiceTransientSection, diagnosisSection, exchangeSection, appBudgetSection];

function parseFlags(args: readonly string[]): Map<string, string> {
  const flags = new Map<string, string>();
  for (const a of args) {
    const m = /^--([^=]+)(?:=(.*))?$/.exec(a);
    if (m) flags.set(m[1]!, m[2] ?? '');
  }
  return flags;
}

async function main(): Promise<void> {
  const context: BenchContext = { results: new Map(), flags: parseFlags(process.argv.slice(2)) };
  const summary: Record<string, unknown> = {
    node: process.version,
    date: new Date().toISOString(),
  };
  const only = context.flags.get('only')?.split(',');
  for (const section of SECTIONS) {
    if (only !== undefined && !only.includes(section.key)) continue;
    console.log(`\n== ${section.title}`);
    const result = await section.run(context);
    if (result.table) console.log(formatTable(result.table));
    for (const note of result.notes ?? []) console.log(note);
    context.results.set(section.key, result.json);
    summary[section.key] = result.json;
  }
  console.log('');
  console.log(JSON.stringify(summary));
}

main().catch((e: unknown) => {
  console.error(e);
  process.exitCode = 1;
});
