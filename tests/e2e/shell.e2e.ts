// The foundation holds: the real server serves the exported app, the signed-in shell renders with
// the shipped typeface, with a bottom tab bar on a phone and a side rail on a wide screen.
import { openBrowser, shot, startTestServer, type TestBrowser, type TestServer } from './harness';

let server: TestServer;
let browser: TestBrowser;

beforeAll(async () => {
  server = await startTestServer();
  browser = await openBrowser();
});

afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

async function signedInPage(viewport: 'phone' | 'wide') {
  const page = await browser.newPage(viewport);
  await page.goto(server.url + '/');
  // String expressions run in the browser untouched (a function would be rewritten by Babel).
  const status = await page.evaluate<number>(`fetch('/api/auth/sign-in', {
    method: 'POST',
    headers: { 'Content-Type': 'application/json' },
    body: JSON.stringify({ email: 'sam@northfold.example', password: 'northfold-engineer' }),
  }).then((res) => res.status)`);
  expect(status).toBe(200);
  await page.goto(server.url + '/designs');
  await page.getByTestId('app-shell').waitFor({ state: 'visible', timeout: 30_000 });
  return page;
}

async function loadedFontFamilies(page: import('playwright-core').Page): Promise<string[]> {
  return page.evaluate<string[]>(`document.fonts.ready.then(() =>
    Array.from(document.fonts).filter((f) => f.status === 'loaded').map((f) => f.family.replace(/["']/g, '')))`);
}

it.each([
  ['phone', 'nav-tabs', 'nav-rail'],
  ['wide', 'nav-rail', 'nav-tabs'],
] as const)('on a %s screen the shell shows %s, uses Inter, and serves deep links', async (viewport, shown, hidden) => {
  const page = await signedInPage(viewport);
  await page.getByTestId(shown).waitFor({ state: 'visible' });
  expect(await page.getByTestId(hidden).count()).toBe(0);

  const families = await loadedFontFamilies(page);
  expect(families.some((f) => /inter/i.test(f))).toBe(true);
  const headerFont = await page.getByTestId('app-header').evaluate((el) => getComputedStyle(el.querySelector('div[dir="auto"]') ?? el).fontFamily);
  expect(headerFont).toMatch(/inter/i);

  // The page never scrolls sideways on a phone.
  const overflow = await page.evaluate<number>('document.documentElement.scrollWidth - window.innerWidth');
  expect(overflow).toBeLessThanOrEqual(1);

  await shot(page, `shell-${viewport}`);

  // A deep link served by the SPA fallback renders the app, not a server 404.
  const response = await page.goto(server.url + '/designs?from=deep-link');
  expect(response?.status()).toBe(200);
  await page.getByTestId('app-shell').waitFor({ state: 'visible', timeout: 30_000 });
  await page.close();
});

it('answers /api/health with the database ok from the real process', async () => {
  const res = await fetch(server.url + '/api/health');
  expect(res.status).toBe(200);
  expect(await res.json()).toMatchObject({ database: 'ok' });
});
