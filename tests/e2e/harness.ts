// What every browser test needs: the real server in its own process with a fresh data directory,
// and Debian's Chromium through playwright-core (never a downloaded browser).
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';

const root = path.resolve(__dirname, '..', '..');
export const artifactsDir = path.join(root, 'tests', 'e2e', 'artifacts');
export const CHROMIUM = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';

export interface TestServer {
  url: string;
  dataDir: string;
  /** Everything the server printed so far (seed output, errors). */
  output(): string;
  stop(): Promise<void>;
}

export async function startTestServer(options: { env?: Record<string, string> } = {}): Promise<TestServer> {
  if (!fs.existsSync(path.join(root, 'dist', 'index.html'))) {
    throw new Error('dist/index.html is missing: run `npx expo export --platform web --output-dir dist` first (npm test does).');
  }
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'ringwell-e2e-'));
  const child: ChildProcess = spawn(process.execPath, [path.join(root, 'node_modules', 'tsx', 'dist', 'cli.mjs'), 'server/index.ts'], {
    cwd: root,
    env: {
      ...process.env,
      PORT: '0',
      HOST: '127.0.0.1',
      DATA_DIR: dataDir,
      WEB_DIR: path.join(root, 'dist'),
      SMTP_PORT: '0',
      NODE_ENV: 'test',
      ...options.env,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let log = '';
  child.stdout?.on('data', (d) => (log += d));
  child.stderr?.on('data', (d) => (log += d));

  const url = await new Promise<string>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`server did not start in 60 s:\n${log}`)), 60_000);
    const onData = () => {
      const match = /Serving on (http:\/\/localhost:\d+)/.exec(log);
      if (match) {
        clearTimeout(timer);
        resolve(match[1].replace('localhost', '127.0.0.1'));
      }
    };
    child.stdout?.on('data', onData);
    child.once('exit', (code) => {
      clearTimeout(timer);
      reject(new Error(`server exited with ${code} before serving:\n${log}`));
    });
  });

  return {
    url,
    dataDir,
    output: () => log,
    stop: async () => {
      if (child.exitCode === null) {
        const exited = new Promise((r) => child.once('exit', r));
        child.kill('SIGTERM');
        await Promise.race([exited, new Promise((r) => setTimeout(r, 5000))]);
        if (child.exitCode === null) child.kill('SIGKILL');
      }
      fs.rmSync(dataDir, { recursive: true, force: true });
    },
  };
}

export const viewports = {
  phone: { width: 390, height: 844 },
  wide: { width: 1440, height: 900 },
} as const;

export interface TestBrowser {
  browser: BrowserContext;
  newPage(viewport: keyof typeof viewports): Promise<Page>;
  close(): Promise<void>;
}

export async function openBrowser(): Promise<TestBrowser> {
  if (!fs.existsSync(CHROMIUM)) {
    throw new Error(`${CHROMIUM} is missing: install Debian's chromium package (npm test does it with apt-get).`);
  }
  const profile = fs.mkdtempSync(path.join(os.tmpdir(), 'ringwell-chromium-'));
  const browser = await chromium.launchPersistentContext(profile, {
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
    acceptDownloads: true,
  });
  for (const page of browser.pages()) await page.close();
  return {
    browser,
    newPage: async (viewport) => {
      const page = await browser.newPage();
      await page.setViewportSize(viewports[viewport]);
      return page;
    },
    close: async () => {
      await browser.close();
      fs.rmSync(profile, { recursive: true, force: true });
    },
  };
}

/**
 * Saves a screenshot of the whole screen under tests/e2e/artifacts/ (git-ignored) and returns its
 * path. The app scrolls inside its own containers (the page itself never scrolls), so a full-page
 * shot would show only the first screenful: the window is made as tall as the longest scrolling
 * content for the shot, then put back.
 */
export async function shot(page: Page, name: string): Promise<string> {
  fs.mkdirSync(artifactsDir, { recursive: true });
  const file = path.join(artifactsDir, `${name}.png`);
  const size = page.viewportSize();
  // A string expression runs in the browser untouched (a function would be rewritten by Babel).
  const tallest = await page.evaluate<number>(`(() => {
    let extra = 0;
    for (const el of Array.from(document.querySelectorAll('div'))) {
      const overflow = getComputedStyle(el).overflowY;
      if (el.scrollHeight > el.clientHeight + 1 && overflow !== 'visible' && overflow !== 'hidden')
        extra = Math.max(extra, el.scrollHeight - el.clientHeight);
    }
    return extra;
  })()`);
  if (size && tallest > 0) {
    await page.setViewportSize({ width: size.width, height: Math.min(size.height + tallest, 8000) });
    await page.waitForTimeout(400);
  }
  await page.screenshot({ path: file, fullPage: true });
  if (size && tallest > 0) await page.setViewportSize(size);
  return file;
}
