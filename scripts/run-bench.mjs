// Runs the benchmark on the code as it ships: bench/run.ts and everything it imports are
// bundled into one module first (as Vite bundles the app), so module-interop overhead of a
// TypeScript loader does not count against the engine. Arguments pass through to bench/run.ts.
import { build } from 'esbuild';
import { mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';

// Inside the project, so the bundle's imports of npm packages resolve from node_modules.
const cache = join(process.cwd(), 'node_modules', '.cache');
mkdirSync(cache, { recursive: true });
const dir = mkdtempSync(join(cache, 'ripplewright-bench-'));
const outfile = join(dir, 'bench.mjs');
try {
  await build({
    entryPoints: ['bench/run.ts'],
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    packages: 'external',
    outfile,
    logLevel: 'warning',
  });
  await import(pathToFileURL(outfile).href);
} finally {
  // The bench's main() runs on import; let it finish before cleaning up.
  process.on('exit', () => rmSync(dir, { recursive: true, force: true }));
}
