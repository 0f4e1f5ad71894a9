/**
 * Builds the app into test-output/e2e-dist (dist/ is left alone), serves it with `vite preview`
 * on a free port, and tells the tests where it is and where Chromium is. Without Chromium the
 * tests skip, unless RIPPLEWRIGHT_REQUIRE_CHROMIUM=1 (CI), when the run fails here.
 */
import type { ChildProcess } from 'node:child_process';
import { existsSync, mkdirSync, rmSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import type { TestProject } from 'vitest/node';
import { buildProduction, startPreview } from './served-build';

declare module 'vitest' {
  export interface ProvidedContext {
    /** Chromium's path, or "" when it is missing (the tests then skip). */
    chromium: string;
    baseUrl: string;
    /** The served build (the update test edits sw.js here). */
    distDir: string;
  }
}

const ROOT = fileURLToPath(new URL('../..', import.meta.url));
export const DIST = `${ROOT}test-output/e2e-dist`;

function findChromium(): string {
  const candidates = [process.env.RIPPLEWRIGHT_CHROMIUM, '/usr/bin/chromium', '/usr/bin/chromium-browser'];
  return candidates.find((path) => path !== undefined && path !== '' && existsSync(path)) ?? '';
}

async function waitForServer(url: string, child: ChildProcess, ms: number): Promise<void> {
  const until = Date.now() + ms;
  let exited = false;
  child.once('exit', () => (exited = true));
  while (Date.now() < until && !exited) {
    try {
      const response = await fetch(url);
      if (response.ok) return;
    } catch {
      // Not listening yet.
    }
    await new Promise((resolve) => setTimeout(resolve, 100));
  }
  throw new Error(exited ? 'vite preview exited before it served the app' : `vite preview did not answer at ${url}`);
}

export default async function setup(project: TestProject): Promise<() => Promise<void>> {
  const chromium = findChromium();
  project.provide('chromium', chromium);
  project.provide('distDir', DIST);
  if (chromium === '') {
    if (process.env.RIPPLEWRIGHT_REQUIRE_CHROMIUM === '1') {
      throw new Error('Chromium not found (looked at $RIPPLEWRIGHT_CHROMIUM, /usr/bin/chromium) and RIPPLEWRIGHT_REQUIRE_CHROMIUM=1: apt-get install chromium');
    }
    console.warn('test/e2e: Chromium not found (apt-get install chromium); the browser tests are skipped.');
    project.provide('baseUrl', '');
    return async () => undefined;
  }
  rmSync(DIST, { recursive: true, force: true });
  mkdirSync(DIST, { recursive: true });
  await buildProduction(DIST, 'warn');
  const { child, url: baseUrl } = await startPreview(DIST, 'inherit');
  // However the run ends, the server goes with it.
  process.once('exit', () => child.exitCode === null && child.kill('SIGKILL'));
  try {
    await waitForServer(baseUrl, child, 30_000);
  } catch (error) {
    child.kill();
    throw error;
  }
  project.provide('baseUrl', baseUrl);
  return async () => {
    if (child.exitCode === null) {
      const exited = new Promise((resolve) => child.once('exit', resolve));
      child.kill('SIGTERM');
      await Promise.race([exited, new Promise((resolve) => setTimeout(resolve, 3000))]);
      if (child.exitCode === null) child.kill('SIGKILL');
    }
  };
}
