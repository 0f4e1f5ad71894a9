#!/usr/bin/env node
// Launcher for the TypeScript command line: tsx (a devDependency) compiles src/ on the fly, so
// the CLI runs from a clone after `npm ci`, with no build step.
import { fileURLToPath } from 'node:url';
import { register } from 'tsx/esm/api';

register({ tsconfig: fileURLToPath(new URL('../tsconfig.json', import.meta.url)) });

// A closed pipe (`ripplewright expect --batch < big | head`) is a normal way to stop reading.
process.stdout.on('error', (error) => {
  if (error.code === 'EPIPE') process.exit(process.exitCode ?? 0);
  throw error;
});

const { main } = await import('../src/cli/main.ts');
process.exitCode = await main(process.argv.slice(2), {
  stdin: process.stdin,
  stdout: process.stdout,
  stderr: process.stderr,
});
