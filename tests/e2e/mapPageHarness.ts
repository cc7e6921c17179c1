/**
 * What the map page's end-to-end tests and its benchmark share: build the page, start the real server
 * (`server/main.ts`) on a free port with a temporary data folder, and launch Debian's Chromium through
 * playwright-core with the project's flags. Nothing here is mocked.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { chromium, type Browser } from 'playwright-core';
import { build } from 'vite';

export const ROOT = path.join(import.meta.dirname, '..', '..');

/** Chromium flags of HELPER_RULES.md: headless, no sandbox, no GPU, nothing fetched in the background. */
export const CHROMIUM_ARGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
  '--no-first-run',
];

export interface RunningServer {
  url: string;
  dataDir: string;
  process: ChildProcess;
  stop(): Promise<void>;
}

/** Build web/ into web/dist/ (what `npm start` serves), quietly. */
export async function buildPage(): Promise<void> {
  await build({ configFile: path.join(ROOT, 'web', 'vite.config.ts'), logLevel: 'error' });
}

/**
 * Start the server on a free port (PORT=0) with an empty temporary data folder; resolves with its URL
 * once it prints it.
 */
export async function startServer(): Promise<RunningServer> {
  const dataDir = mkdtempSync(path.join(tmpdir(), 'plumeplan-page-'));
  const child = spawn(process.execPath, ['--import', 'tsx', path.join(ROOT, 'server', 'main.ts')], {
    cwd: ROOT,
    env: { ...process.env, HOST: '127.0.0.1', PORT: '0', PLUMEPLAN_DATA: dataDir, PLUMEPLAN_LOG_LEVEL: 'warn', PLUMEPLAN_TOKEN: '' },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let output = '';
  const url = await new Promise<string>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`server did not print its URL within 60 s; output:\n${output}`)), 60_000);
    const look = (chunk: Buffer) => {
      output += chunk.toString();
      const match = /plumeplan server: (http:\/\/\S+?)\/? /.exec(output);
      if (match) {
        clearTimeout(timer);
        resolve(match[1]);
      }
    };
    child.stdout?.on('data', look);
    child.stderr?.on('data', (chunk: Buffer) => (output += chunk.toString()));
    child.once('exit', (code) => {
      clearTimeout(timer);
      reject(new Error(`server exited with ${code} before printing its URL:\n${output}`));
    });
  });
  return {
    url,
    dataDir,
    process: child,
    async stop() {
      if (child.exitCode === null) {
        const exited = new Promise((resolve) => child.once('exit', resolve));
        child.kill('SIGTERM');
        await exited;
      }
      rmSync(dataDir, { recursive: true, force: true });
    },
  };
}

export function launchBrowser(): Promise<Browser> {
  return chromium.launch({ executablePath: '/usr/bin/chromium', args: CHROMIUM_ARGS });
}
