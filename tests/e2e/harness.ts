import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { untilServing } from '../../scripts/free-port.ts';

export const DEMO_PASSWORD = 'roostline-demo';
const CHROMIUM = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';


export interface Harness {
  baseUrl: string;
  browser: Browser;
  dataDir: string;
  /** Every URL the browser requested, for the "no other host" check. */
  requests: string[];
  newPage: (opts?: { viewport?: { width: number; height: number }; hasTouch?: boolean }) => Promise<{ context: BrowserContext; page: Page }>;
  signIn: (page: Page, role: string, password?: string) => Promise<void>;
  stop: () => Promise<void>;
}

/** Starts the real server (npm start's server entry) on a fresh SQLite file with the demo scenario, and Chromium. */
export async function startHarness(env: Record<string, string> = {}): Promise<Harness> {
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'roostline-e2e-'));
  const server: ChildProcess = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    env: { ...process.env, PORT: '0', DATABASE_PATH: path.join(dataDir, 'e2e.sqlite'), UPLOADS_DIR: path.join(dataDir, 'uploads'), SEED_DEMO: 'true', ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let log = '';
  server.stdout!.on('data', (d) => (log += d));
  server.stderr!.on('data', (d) => (log += d));
  const baseUrl = `http://127.0.0.1:${await untilServing(server, () => log)}`;
  const browser = await chromium.launch({
    executablePath: CHROMIUM,
    headless: true,
    args: ['--no-sandbox', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--use-angle=swiftshader', '--enable-unsafe-swiftshader'],
  });
  const requests: string[] = [];
  return {
    baseUrl,
    browser,
    dataDir,
    requests,
    newPage: async (opts = {}) => {
      const context = await browser.newContext({ baseURL: baseUrl, viewport: opts.viewport ?? { width: 1280, height: 900 }, hasTouch: opts.hasTouch });
      const page = await context.newPage();
      page.on('request', (r) => requests.push(r.url()));
      return { context, page };
    },
    signIn: async (page, role, password = DEMO_PASSWORD) => {
      await page.goto('/sign-in');
      await page.getByLabel('E-mail').fill(role.includes('@') ? role : `${role}@roostline.test`);
      await page.getByLabel('Password').fill(password);
      await page.getByRole('button', { name: 'Sign in' }).click();
    },
    stop: async () => {
      await browser.close();
      server.kill('SIGTERM');
      await new Promise((r) => server.once('exit', r));
      fs.rmSync(dataDir, { recursive: true, force: true });
    },
  };
}
