/**
 * Browser tests (playwright gives every launch a fresh, empty profile): the whole product (real server, real database, built client, fake
 * provider, job workers and the local mail capture) driven by Debian's Chromium through playwright-core. A console error or an
 * uncaught page error fails the test.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { expect } from 'vitest';
import { loadConfig } from '../../api/config';
import { repoRoot } from '../../api/config';
import { defaultClientDir, startServer, type RunningServer } from '../../api/server';
import { createTestDatabase, type TestDatabase } from './db';
import { freePort } from './postgres';

export const CHROMIUM = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';

export interface Product {
  origin: string;
  server: RunningServer;
  database: TestDatabase;
  browser: Browser;
  /** A fresh browser profile (cookies, storage) with console-error tracking. */
  newPage(): Promise<{ page: Page; context: BrowserContext; problems: string[] }>;
  close(): Promise<void>;
}

export async function startProduct(env: Record<string, string> = {}): Promise<Product> {
  const database = await createTestDatabase();
  // Uploaded files go to a folder of this run, never the repository's uploads/.
  const uploadsDir = fs.mkdtempSync(path.join(os.tmpdir(), 'rwb-e2e-uploads-'));
  // The origin must name the port (sign-in callback, Origin check), so it is picked first; another
  // process may take it before the server listens, and then a second port is tried.
  const start = async () => {
    const port = await freePort();
    const origin = `http://localhost:${port}`;
    const config = loadConfig({
      UPLOADS_DIR: uploadsDir,
      NODE_ENV: 'test',
      PORT: String(port),
      APP_ORIGIN: origin,
      FAKE_GITHUB_PORT: '0',
      FAKE_SMTP_PORT: '0',
      LOG_LEVEL: 'warn',
      ...env,
    });
    return { origin, server: await startServer(config, { clientDir: defaultClientDir(repoRoot), databaseUrl: database.url }) };
  };
  let started: Awaited<ReturnType<typeof start>>;
  for (let attempt = 1; ; attempt++) {
    try {
      started = await start();
      break;
    } catch (error) {
      if ((error as NodeJS.ErrnoException).code !== 'EADDRINUSE' || attempt === 3) throw error;
    }
  }
  const { origin, server } = started;
  const browser = await chromium.launch({
    executablePath: CHROMIUM,
    headless: true,
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
  const contexts: BrowserContext[] = [];
  return {
    origin,
    server,
    database,
    browser,
    async newPage() {
      const context = await browser.newContext({ baseURL: origin, viewport: { width: 1280, height: 900 } });
      contexts.push(context);
      const page = await context.newPage();
      const problems: string[] = [];
      page.on('console', (message) => {
        if (message.type() === 'error') problems.push(`console.error: ${message.text()}`);
      });
      page.on('pageerror', (error) => problems.push(`page error: ${error.message}`));
      return { page, context, problems };
    },
    async close() {
      for (const c of contexts) await c.close().catch(() => {});
      await browser.close();
      await server.stop();
      await database.drop();
      fs.rmSync(uploadsDir, { recursive: true, force: true });
    },
  };
}

/**
 * No console errors and no page errors. Chromium logs every non-2xx fetch as a console error;
 * a test that provokes an expected answer (a 409 during a conflict) names its status here.
 */
export function expectNoProblems(problems: string[], options: { expectedStatuses?: number[] } = {}) {
  const expected = new Set(options.expectedStatuses ?? []);
  const unexpected = problems.filter((p) => {
    const status = p.match(/Failed to load resource: the server responded with a status of (\d{3})/)?.[1];
    return !(status && expected.has(Number(status)));
  });
  expect(unexpected, 'the page logged errors').toEqual([]);
}
