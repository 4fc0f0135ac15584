// Issue 9 in a real browser, at a phone and a wide viewport: the engineer creates a design from the
// mains power-up preset, sees the live check with the rectifier's checks, opens the mains screen
// and finds the worst switch-on angle marked on the sweep and the cold/hot table.
import path from 'node:path';
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

const T = 60_000;

async function until<T>(read: () => Promise<T>, check: (value: T) => boolean, what: string, timeout = T): Promise<T> {
  const end = Date.now() + timeout;
  let last: T | undefined;
  for (;;) {
    try {
      last = await read();
      if (check(last)) return last;
    } catch {
      // not there yet
    }
    if (Date.now() > end) throw new Error(`${what}: still ${JSON.stringify(last)} after ${timeout} ms`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

describe.each(['wide', 'phone'] as const)('mains power-up at the %s viewport', (viewport) => {
  it('creates a design from the mains preset, checks it, and sweeps the switch-on angle', async () => {
    const page = await browser.newPage(viewport);
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(String(e)));

    await page.context().clearCookies();
    await page.goto(server.url + '/sign-in');
    await page.getByTestId('demo-engineer').waitFor({ timeout: T });
    await page.getByTestId('demo-engineer').click();
    await page.getByTestId('sign-in-submit').click();
    await page.getByTestId('designs-screen').waitFor({ timeout: T });

    await page.getByTestId('new-design').click();
    await page.getByTestId('preset-mains-wall-charger').click();
    await page.getByTestId('new-design-name').fill(`Wall charger (${viewport})`);
    if (await page.getByTestId('new-project-name').count()) await page.getByTestId('new-project-name').fill('Chargers');
    await shot(page, `mains-${viewport}-01-new-design`);
    await page.getByTestId('create-design').click();
    await page.getByTestId('design-screen').waitFor({ timeout: T });

    // The live check ran the mains engine: a peak current and the diode surge check.
    await until(
      () => page.getByTestId('summary-strip-i').first().innerText(),
      (v) => /\d+(\.\d+)? [kmµ]?A/.test(v),
      'summary-strip-i',
    );
    await until(() => page.getByTestId('margins-card').first().innerText(), (v) => /Diode surge current/.test(v), 'margins-card');
    await shot(page, `mains-${viewport}-02-results`);
    if (viewport === 'phone') await page.getByRole('tab', { name: 'Inputs' }).click();
    await page.getByTestId('group-mains').waitFor({ timeout: T });
    expect(await page.getByTestId('field-mains.voltage').first().inputValue()).toMatch(/230/);
    expect(await page.getByTestId('group-source').count()).toBe(0);
    await shot(page, `mains-${viewport}-03-inputs`);
    // The circuit sketch draws the AC source and the diode bridge (not a battery) and the NTC.
    const sketch = page.getByTestId('circuit-sketch').first();
    await sketch.getByTestId('circuit-sketch-bridge').waitFor({ timeout: T });
    expect(await sketch.getByTestId('circuit-sketch-ac-source').count()).toBe(1);
    expect(await sketch.getByTestId('circuit-sketch-ntc').count()).toBe(1);
    expect(await sketch.getByTestId('circuit-sketch-battery').count()).toBe(0);
    expect(await sketch.getByRole('img').first().getAttribute('aria-label')).toMatch(/single-phase AC mains 230 V 50 Hz.*diode bridge \(4 diodes\)/);
    await sketch.screenshot({ path: path.join(__dirname, 'artifacts', `mains-${viewport}-03b-sketch.png`) });
    const designUrl = page.url();

    await page.getByTestId('open-mains').first().click();
    await page.getByTestId('mains-screen').waitFor({ timeout: T });
    const worst = await until(() => page.getByTestId('sweep-worst').innerText(), (v) => /\d+(\.\d)?°/.test(v), 'sweep-worst');
    expect(worst).toMatch(/Worst angle/);
    // The chart marks the worst angle (a ring and its label, also given to screen readers).
    const chart = page.getByTestId('angle-sweep-chart');
    await chart.waitFor({ timeout: T });
    expect(await chart.getAttribute('aria-label')).toMatch(/Worst at \d+(\.\d)? degrees/);
    expect(await chart.locator('svg text').allTextContents()).toEqual(expect.arrayContaining([expect.stringMatching(/^worst \d+(\.\d)?°/)]));
    const table = await until(() => page.getByTestId('cold-hot-table').innerText(), (v) => /Hot, 110 °C/.test(v), 'cold-hot-table');
    expect(table).toMatch(/Cold, 25 °C/);
    expect(table).toMatch(/Peak inrush/);
    expect(table).toMatch(/Diode surge/);
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
    expect(overflow).toBeLessThanOrEqual(1);
    await shot(page, `mains-${viewport}-04-sweep`);

    // A spread of the mains design: save a revision, run the corners of line voltage ±10 %, NTC
    // R25 ±20 % and C ±10 % with −20 % drift (ESR and load, also ticked by default, left out to keep
    // it to 8 corners), and read the inrush over them.
    await page.goto(designUrl);
    await page.getByTestId('design-screen').waitFor({ timeout: T });
    await page.getByTestId('save-revision').first().click();
    await page.getByTestId('revision-note').fill('Mains spread');
    await page.getByTestId('confirm-save-revision').click();
    await page.getByTestId('go-request-review').waitFor({ timeout: T });
    await page.getByTestId('open-spread').first().click();
    await page.getByTestId('spread-screen').waitFor({ timeout: T });
    await page.getByTestId('tol-mains.voltage').waitFor({ timeout: T });
    expect(await page.getByTestId('tol-source.voltage').count()).toBe(0);
    await page.getByTestId('tol-capacitor.esr').click();
    await page.getByTestId('tol-load.value').click();
    await page.getByTestId('spread-run').click();
    try {
      await page.getByTestId('spread-progress-text').getByText('8 of 8 samples').waitFor({ timeout: 120_000 });
    } catch (error) {
      // Keep a picture of what the screen showed instead.
      await shot(page, `mains-${viewport}-05-spread-failed`);
      throw error;
    }
    const inrush = await until(() => page.getByTestId('spread-mains-metrics').innerText(), (v) => /Peak inrush current/.test(v), 'spread-mains-metrics');
    expect(inrush).toMatch(/own worst switch-on angle/);
    expect(inrush).toMatch(/Surge current \(half-sine equivalent\)/);
    expect(await page.getByTestId('histogram-surgeEquivalentCurrent').count()).toBe(1);
    const spreadOverflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
    expect(spreadOverflow).toBeLessThanOrEqual(1);
    await shot(page, `mains-${viewport}-05-spread`);
    expect(errors).toEqual([]);
    await page.close();
  }, 240_000);
});
