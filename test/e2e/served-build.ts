/**
 * A production build of the app served by `vite preview` on a free loopback port, and the
 * Chromium flags for this machine: shared by the browser tests' setup and the app-budget bench.
 * Node only.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync } from 'node:fs';
import { createServer } from 'node:net';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

/**
 * The repository root: the nearest folder above this module holding vite.config.ts. Found by
 * looking, not by a fixed "../..", because the bench runs this module bundled into
 * node_modules/.cache/….
 */
function findRoot(from: string): string {
  for (let dir = dirname(from); ; dir = dirname(dir)) {
    if (existsSync(join(dir, 'vite.config.ts')) && existsSync(join(dir, 'package.json'))) return `${dir}/`;
    if (dirname(dir) === dir) throw new Error(`no vite.config.ts above ${from}`);
  }
}

const ROOT = findRoot(fileURLToPath(import.meta.url));

/**
 * Headless Debian Chromium as root, with its background networking off (the machine reaches no
 * host but the package registries, and Chromium would otherwise try many).
 */
export const CHROMIUM_ARGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];

/** A free TCP port on 127.0.0.1. */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = createServer();
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const address = server.address();
      server.close(() => (typeof address === 'object' && address !== null ? resolve(address.port) : reject(new Error('no port'))));
    });
  });
}

/**
 * Builds the app for production into `outDir`. Vite takes a build for production only when
 * NODE_ENV says so (import.meta.env.PROD, which turns the service worker on), and vitest runs
 * with NODE_ENV=test, so it is set for the build and put back.
 */
export async function buildProduction(outDir: string, logLevel: 'warn' | 'error'): Promise<void> {
  const { build } = await import('vite');
  const nodeEnv = process.env.NODE_ENV;
  process.env.NODE_ENV = 'production';
  try {
    await build({ root: ROOT, configFile: `${ROOT}vite.config.ts`, mode: 'production', logLevel, build: { outDir, emptyOutDir: true } });
  } finally {
    process.env.NODE_ENV = nodeEnv;
  }
}

/**
 * Serves a build with vite's own entry (not npx: stopping npx would leave vite running) on a
 * free port. The caller stops the child.
 */
export async function startPreview(outDir: string, stderr: 'ignore' | 'inherit'): Promise<{ child: ChildProcess; url: string }> {
  const port = await freePort();
  const child = spawn(process.execPath, [`${ROOT}node_modules/vite/bin/vite.js`, 'preview', '--outDir', outDir, '--host', '127.0.0.1', '--port', String(port), '--strictPort'], {
    cwd: ROOT,
    stdio: ['ignore', 'ignore', stderr],
  });
  return { child, url: `http://127.0.0.1:${port}/` };
}
