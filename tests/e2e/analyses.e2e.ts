// Issue 7 in a real browser at a phone and a wide viewport, against the real server with the demo
// workspace: on "Cargo-bike drive" the engineer runs a corners spread (the progress bar runs to the
// end and the histograms appear), opens stability and reads the verdict; on "Gate-drive test" the
// snubber screen proposes Rs and Cs with the before/after waveforms.
import type { Page } from 'playwright-core';
import { openBrowser, shot, startTestServer, type TestBrowser, type TestServer } from './harness';

let server: TestServer;
let browser: TestBrowser;

beforeAll(async () => {
  server = await startTestServer();
  browser = await openBrowser();
}, 120_000);

afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

const T = 30_000;

async function signIn(page: Page) {
  await page.context().clearCookies();
  await page.goto(server.url + '/sign-in');
  await page.getByTestId('sign-in').waitFor({ timeout: T });
  await page.getByTestId('demo-engineer').click();
  await page.getByTestId('sign-in-submit').click();
  await page.getByTestId('app-shell').waitFor({ timeout: T });
}

async function noSidewaysScroll(page: Page) {
  const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
  expect(overflow).toBeLessThanOrEqual(1);
}

async function openDesign(page: Page, name: RegExp) {
  await page.goto(server.url + '/designs');
  await page.getByTestId('designs-screen').waitFor({ timeout: T });
  await page.getByText(name).first().click();
  await page.getByTestId('design-screen').waitFor({ timeout: T });
}

describe.each(['wide', 'phone'] as const)('at the %s viewport', (viewport) => {
  it('runs a spread, reads the stability verdict and gets a snubber proposal', async () => {
    const page = await browser.newPage(viewport);
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(String(e)));
    await signIn(page);

    await openDesign(page, /Cargo-bike drive/);
    await page.getByTestId('open-spread').click();
    await page.getByTestId('spread-screen').waitFor({ timeout: T });
    // The two viewports share a server: the phone leaves one tolerance out, so it runs afresh.
    if (viewport === 'phone') await page.getByTestId('tol-load.value').click();
    await page.getByTestId('spread-run').click();
    await page.getByTestId('spread-progress').waitFor({ timeout: T });
    const expected = viewport === 'phone' ? '16 of 16 samples' : '32 of 32 samples';
    await page.getByTestId('spread-progress-text').getByText(expected).waitFor({ timeout: 60_000 });
    await page.getByTestId('spread-result').waitFor({ timeout: T });
    await page.getByTestId('histogram-peakCapacitorVoltage').or(page.locator('[data-testid^="histogram-"]').first()).first().waitFor({ timeout: T });
    expect(await page.locator('[data-testid^="histogram-"]').count()).toBeGreaterThan(0);
    await noSidewaysScroll(page);
    await shot(page, `analyses-${viewport}-01-spread`);

    await page.getByTestId('back-to-design').click();
    await page.getByTestId('design-screen').waitFor({ timeout: T });
    await page.getByTestId('open-stability').click();
    await page.getByTestId('stability-verdict').waitFor({ timeout: T });
    expect(await page.getByTestId('stability-margin').innerText()).toMatch(/-?\d+(\.\d)? dB/);
    await page.getByTestId('impedance-chart').waitFor({ timeout: T });
    await noSidewaysScroll(page);
    await shot(page, `analyses-${viewport}-02-stability`);

    await openDesign(page, /Gate-drive test/);
    await page.getByTestId('open-snubber').click();
    await page.getByTestId('snubber-screen').waitFor({ timeout: T });
    await page.getByTestId('snubber-proposal').waitFor({ timeout: T });
    expect(await page.getByTestId('snubber-rs').innerText()).toMatch(/\d+(\.\d+)? [mk]?Ω/);
    await page.getByTestId('snubber-after-chart').waitFor({ timeout: T });
    await noSidewaysScroll(page);
    await shot(page, `analyses-${viewport}-03-snubber`);

    expect(errors).toEqual([]);
    await page.close();
  }, 240_000);
});
