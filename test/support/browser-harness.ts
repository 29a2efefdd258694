// Build the page with vite, serve it with `vite preview` on 127.0.0.1 (strict port) and drive
// Debian's Chromium with playwright-core. The server is always killed, also when a test fails.

import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { createServer } from 'node:net';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { build } from 'vite';
import { chromium, type Browser } from 'playwright-core';

export const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
export const CHROMIUM = '/usr/bin/chromium';
export const ARTIFACTS = join(ROOT, 'test-artifacts', 'browser');

export function chromiumMissing(): string | null {
  return existsSync(CHROMIUM)
    ? null
    : `${CHROMIUM} is missing (apt-get install -y chromium); the browser tests need it`;
}

/** A free port on 127.0.0.1 (the server still binds it with --strictPort). */
async function freePort(): Promise<number> {
  return new Promise((res, rej) => {
    const s = createServer();
    s.once('error', rej);
    s.listen(0, '127.0.0.1', () => {
      const port = (s.address() as { port: number }).port;
      s.close(() => res(port));
    });
  });
}

/**
 * Build the page into a folder of its own and return it, so that browser test files (and people)
 * building at the same time cannot pull the files from under each other.
 */
export async function buildPage(): Promise<string> {
  const outDir = mkdtempSync(join(tmpdir(), 'pycno-page-'));
  await build({
    root: join(ROOT, 'viewer'),
    configFile: join(ROOT, 'vite.config.ts'),
    logLevel: 'warn',
    build: { outDir, emptyOutDir: true },
  });
  return outDir;
}

export interface Served {
  url: string;
  stop(): Promise<void>;
}

export async function servePage(outDir: string): Promise<Served> {
  const port = await freePort();
  // vite's own binary, not npx: killing npx would leave vite holding the port.
  const child: ChildProcess = spawn(
    join(ROOT, 'node_modules/.bin/vite'),
    ['preview', '--outDir', outDir, '--host', '127.0.0.1', '--port', String(port), '--strictPort'],
    {
      cwd: ROOT,
      stdio: ['ignore', 'pipe', 'pipe'],
    },
  );
  let log = '';
  child.stdout!.on('data', (d) => (log += d));
  child.stderr!.on('data', (d) => (log += d));
  const url = `http://127.0.0.1:${port}/`;
  const stop = async () => {
    if (child.exitCode === null) {
      child.kill('SIGTERM');
      await new Promise((r) => child.once('exit', r));
    }
    rmSync(outDir, { recursive: true, force: true });
  };
  try {
    const t0 = Date.now();
    for (;;) {
      if (child.exitCode !== null) throw new Error(`vite preview exited: ${log}`);
      try {
        const r = await fetch(url);
        if (r.ok) break;
      } catch {
        /* not up yet */
      }
      if (Date.now() - t0 > 30_000) throw new Error(`vite preview did not answer on ${url}: ${log}`);
      await new Promise((r) => setTimeout(r, 100));
    }
  } catch (e) {
    await stop();
    throw e;
  }
  return { url, stop };
}

export async function launch(extraArgs: string[] = []): Promise<Browser> {
  mkdirSync(ARTIFACTS, { recursive: true });
  return chromium.launch({
    executablePath: CHROMIUM,
    headless: true,
    // Explicit so that a change in playwright-core cannot switch software WebGL off.
    args: [
      '--no-sandbox',
      '--enable-unsafe-swiftshader',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
      ...extraArgs,
    ],
  });
}

/** Console noise that says nothing about the page (see shared browser-testing notes). */
export function isNoise(text: string): boolean {
  return /GPU stall due to ReadPixels|favicon\.ico|Automatic fallback to software WebGL|WebGL: INVALID|GroupMarkerNotSet/.test(
    text,
  );
}
