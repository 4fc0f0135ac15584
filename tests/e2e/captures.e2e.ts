// Issue 8 in a real browser, at a phone and a wide viewport: the engineer uploads a bench capture
// (made by the engine, with noise), maps its columns, sees it over the simulation, fits the source
// L and R and applies the fit to the draft; then imports a parts CSV with one bad row, sees the row
// named, and imports only the valid rows.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Page } from 'playwright-core';
import { syntheticCsv } from '@/tests/fixtures/captures/synthetic';
import { openBrowser, shot, startTestServer, type TestBrowser, type TestServer } from './harness';

// The apply step flaked once under load (see below); one retry, with the first error logged.
jest.retryTimes(1, { logErrorsBeforeRetry: true });

let server: TestServer;
let browser: TestBrowser;
let dir: string;

const T = 30_000;

// REFERENCE §1 case A: 48 V through 280 Ω and 0.1 H onto 0.4 µF.
const caseA = {
  source: { voltage: '48 V', resistance: '280 Ω', inductance: '0.1 H' },
  capacitor: { capacitance: '0.4 µF' },
  duration: '5 ms',
};

beforeAll(async () => {
  server = await startTestServer();
  browser = await openBrowser();
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'ringwell-captures-e2e-'));
  fs.writeFileSync(
    path.join(dir, 'case-a.csv'),
    syntheticCsv(caseA, { quantity: 'capacitorVoltage', noise: 0.2, seed: 8, samples: 5000, preTrigger: 0.5e-3 }),
  );
}, 120_000);

afterAll(async () => {
  await browser?.close();
  await server?.stop();
  if (dir) fs.rmSync(dir, { recursive: true, force: true });
});

async function signIn(page: Page, role: 'engineer' | 'admin') {
  await page.context().clearCookies();
  await page.goto(server.url + '/sign-in');
  await page.getByTestId('sign-in').waitFor({ timeout: T });
  await page.getByTestId(`demo-${role}`).click();
  await page.getByTestId('sign-in-submit').click();
  await page.getByTestId('app-shell').waitFor({ timeout: T });
}

async function noSidewaysScroll(page: Page) {
  const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
  expect(overflow).toBeLessThanOrEqual(1);
}

async function choose(page: Page, buttonId: string, file: string) {
  const [chooser] = await Promise.all([page.waitForEvent('filechooser', { timeout: T }), page.getByTestId(buttonId).click()]);
  await chooser.setFiles(file);
}

describe.each(['wide', 'phone'] as const)('at the %s viewport', (viewport) => {
  it('uploads a capture, maps it, overlays it, fits the source L and R and applies the fit', async () => {
    const page = await browser.newPage(viewport);
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(String(e)));
    await signIn(page, 'engineer');

    // A design whose source L and R are poor guesses (made through the API with the page's session).
    const project = await page.request.post(`${server.url}/api/projects`, { data: { name: `Bench rig (${viewport})` } });
    expect(project.status()).toBe(201);
    const design = await page.request.post(`${server.url}/api/designs`, {
      data: {
        projectId: (await project.json()).id,
        name: `Case A on the bench (${viewport})`,
        draft: { ...caseA, source: { voltage: '48 V', resistance: '1 Ω', inductance: '1 mH' } },
      },
    });
    expect(design.status()).toBe(201);
    const designId = (await design.json()).id as string;

    // The editor links to the captures.
    await page.goto(`${server.url}/designs/${designId}`);
    await page.getByTestId('open-captures').click();
    await page.getByTestId('captures-screen').waitFor({ timeout: T });

    await choose(page, 'capture-choose', path.join(dir, 'case-a.csv'));
    await page.getByTestId('capture-mapping').waitFor({ timeout: T });
    await page.getByTestId('capture-preview-table').waitFor({ timeout: T });
    // The header says µs; the channel is in mV.
    await page.getByTestId('capture-unit').getByText('mV', { exact: true }).click();
    await shot(page, `captures-${viewport}-01-mapping`);
    await noSidewaysScroll(page);

    await page.getByTestId('capture-store').click();
    await page.getByTestId('capture-overlay-card').waitFor({ timeout: T });
    await page.getByTestId('capture-overlay').locator('path').first().waitFor({ timeout: T });
    await page.waitForTimeout(500);
    await shot(page, `captures-${viewport}-02-overlay`);

    await page.getByTestId('capture-fit-run').click();
    await page.getByTestId('capture-fit-result').waitFor({ timeout: 60_000 });
    const result = await page.getByTestId('capture-fit-result').innerText();
    expect(result).toMatch(/Source inductance\s*(9\d\.\d+|10[01]\.\d+) mH/);
    expect(result).toMatch(/Source resistance\s*2[78]\d(\.\d+)? Ω/);
    // The fitted curve's simulation arrives a moment after the fit and adds a legend entry, which
    // wraps to a new line on a phone and moves the button down: wait for it before clicking (a click
    // aimed before the shift lands beside the button; the likely cause of the failure seen once).
    await page.getByText('Simulated (fitted)').first().waitFor({ timeout: T });
    await page.waitForTimeout(300);
    await page.getByTestId('capture-fit-apply').click();
    // Seen once on a loaded CI machine: "applied" never showed at the phone size. Keep a picture of
    // the screen when that happens, so the cause can be read off it.
    await page
      .getByTestId('capture-fit-applied')
      .waitFor({ timeout: T })
      .catch(async (error) => {
        await shot(page, `captures-${viewport}-03-fit-apply-FAILED`);
        throw error;
      });
    await page.waitForTimeout(800);
    await shot(page, `captures-${viewport}-03-fit-applied`);

    const stored = await (await page.request.get(`${server.url}/api/designs/${designId}`)).json();
    expect(stored.draft.source.inductance).toBeGreaterThan(0.098);
    expect(stored.draft.source.inductance).toBeLessThan(0.102);
    expect(errors).toEqual([]);
    await page.close();
  });

  it('imports a parts CSV with one bad row: names it, then imports only the valid rows', async () => {
    const page = await browser.newPage(viewport);
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(String(e)));
    await signIn(page, 'engineer');
    const template = await (await page.request.get(`${server.url}/api/parts/template.csv`)).text();
    const header = template.split(/\r?\n/)[0];
    const columns = header.split(',');
    const row = (values: Record<string, string>) => columns.map((c) => values[c.split(' ')[0]] ?? '').join(',');
    const suffix = viewport === 'wide' ? 'W' : 'P';
    const file = path.join(dir, `parts-${viewport}.csv`);
    fs.writeFileSync(
      file,
      [
        header,
        row({ kind: 'inductor', partNumber: `NF-IND-E2E${suffix}1`, inductance: '12 µH', description: 'Bench choke' }),
        row({ kind: 'capacitor', partNumber: `NF-CAP-E2E${suffix}2`, capacitance: 'lots', ratedVoltage: '500 V' }),
        row({ kind: 'fuse', partNumber: `NF-FUS-E2E${suffix}3`, meltingI2t: '18 kA²s' }),
      ].join('\n'),
    );

    await page.goto(`${server.url}/parts`);
    await page.getByTestId('parts-screen').waitFor({ timeout: T });
    await page.getByTestId('parts-table').waitFor({ timeout: T });
    await shot(page, `parts-${viewport}-01-library`);
    await noSidewaysScroll(page);

    await choose(page, 'parts-import-choose', file);
    await page.getByTestId('parts-import-errors').waitFor({ timeout: T });
    const problems = await page.getByTestId('parts-import-errors').innerText();
    expect(problems).toMatch(/Nothing was imported/);
    expect(problems).toMatch(/Row 3, capacitance/);
    await shot(page, `parts-${viewport}-02-import-errors`);
    await page.getByTestId('parts-import-valid-only').click();
    await page.getByTestId('parts-import-done').waitFor({ timeout: T });
    expect(await page.getByTestId('parts-import-done').innerText()).toMatch(/Imported 2 of 3 rows/);

    await page.getByTestId('parts-search').fill(`E2E${suffix}`);
    await page.getByText(`NF-IND-E2E${suffix}1`).first().waitFor({ timeout: T });
    await page.getByText(`NF-FUS-E2E${suffix}3`).first().waitFor({ timeout: T });
    expect(await page.getByText(`NF-CAP-E2E${suffix}2`).count()).toBe(0);
    await shot(page, `parts-${viewport}-03-imported`);
    expect(errors).toEqual([]);
    await page.close();
  });
});
