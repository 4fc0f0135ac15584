// Issue 6's whole job in a real browser, at a phone and a wide viewport, against the real server
// with a fresh database: the engineer creates a design from the precharge preset, changes the
// capacitance and sees the peak current move, sizes the precharge resistor and applies a value,
// saves a revision and requests a review; the reviewer finds the e-mail in My mail, approves, and
// downloads the margin report (a PDF); the admin sees the outbox and the audit log.
import fs from 'node:fs';
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

async function signIn(page: Page, role: 'engineer' | 'reviewer' | 'admin') {
  // The browser profile is shared between tests: start each sign-in from no session.
  await page.context().clearCookies();
  await page.goto(server.url + '/sign-in');
  await page.getByTestId('sign-in').waitFor({ timeout: T });
  await page.getByTestId(`demo-${role}`).click();
  await page.getByTestId('sign-in-submit').click();
  await page.getByTestId('app-shell').waitFor({ timeout: T });
}

async function signOut(page: Page) {
  await page.getByTestId('user-menu-button').click();
  await page.getByRole('menuitem', { name: 'Sign out' }).click();
  await page.getByTestId('sign-in').waitFor({ timeout: T });
}

async function noSidewaysScroll(page: Page) {
  const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
  expect(overflow).toBeLessThanOrEqual(1);
}

const text = (page: Page, testId: string) => page.getByTestId(testId).first().innerText();

/** Polls until the value satisfies the check (Jest has no expect.poll); fails with the last value. */
async function until<T>(read: () => Promise<T>, check: (value: T) => boolean, what: string, timeout = 15_000): Promise<T> {
  const end = Date.now() + timeout;
  let last: T | undefined;
  for (;;) {
    try {
      last = await read();
      if (check(last)) return last;
    } catch {
      // The element may not be there yet.
    }
    if (Date.now() > end) throw new Error(`${what}: still ${JSON.stringify(last)} after ${timeout} ms`);
    await new Promise((r) => setTimeout(r, 150));
  }
}

async function showInputs(page: Page, viewport: 'phone' | 'wide') {
  if (viewport === 'phone') await page.getByRole('tab', { name: 'Inputs' }).click();
}

describe.each(['wide', 'phone'] as const)('at the %s viewport', (viewport) => {
  const designName = `Depot charger DC link (${viewport} check)`;

  it('the engineer sets up the design, sizes the precharge, saves a revision and requests a review', async () => {
    const page = await browser.newPage(viewport);
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(String(e)));

    await page.context().clearCookies();
    await page.goto(server.url + '/sign-in');
    await page.getByTestId('sign-in').waitFor({ timeout: T });
    await page.getByTestId('demo-engineer').waitFor({ timeout: T });
    await shot(page, `${viewport}-01-sign-in`);
    await signIn(page, 'engineer');
    await page.getByTestId('designs-screen').waitFor({ timeout: T });
    await shot(page, `${viewport}-02-designs`);
    await noSidewaysScroll(page);

    // Create from the precharge preset.
    await page.getByTestId('new-design').click();
    await page.getByTestId('preset-dc-link-precharge').click();
    await page.getByTestId('new-design-name').fill(designName);
    if (await page.getByTestId('new-project-name').count()) await page.getByTestId('new-project-name').fill('Depot charger');
    await shot(page, `${viewport}-03-new-design`);
    await page.getByTestId('create-design').click();
    await page.getByTestId('design-screen').waitFor({ timeout: T });
    await until(
      () => text(page, 'summary-strip-i'),
      (v) => /\d+(\.\d+)? [kmµ]?A/.test(String(v)),
      "() => text(page, 'summary-strip-i')",
      T,
    );
    await page.getByTestId('waveform-chart').waitFor({ timeout: T });
    const before = await text(page, 'summary-strip-i');
    if (viewport === 'wide') {
      // The cursor reads values where the pointer is.
      const chart = page.getByTestId('waveform-chart-frame');
      const box = (await chart.boundingBox())!;
      await page.mouse.move(box.x + box.width * 0.4, box.y + box.height * 0.3);
      await until(
        () => text(page, 'waveform-chart-readout'),
        (v) => /t = [\d.]+ [pnµm]?s/.test(String(v)),
        "() => text(page, 'waveform-chart-readout')",
      );
    }
    expect(await page.getByTestId('high-voltage-notice').count()).toBe(1);
    await shot(page, `${viewport}-04-design-results`);
    await noSidewaysScroll(page);

    // A larger DC link: the second inrush at the bypass grows.
    await showInputs(page, viewport);
    const capacitance = page.getByTestId('field-capacitor.capacitance');
    await capacitance.fill('1.5m');
    await until(
      () => text(page, 'field-capacitor.capacitance-parsed'),
      (v) => v === '= 1.5 mF',
      "() => text(page, 'field-capacitor.capacitance-parsed')",
    );
    await until(
      () => text(page, 'summary-strip-i'),
      (v) => v !== before,
      "() => text(page, 'summary-strip-i')",
      T,
    );
    // A wrong unit is named, not guessed.
    await capacitance.fill('5 V');
    await until(
      () => text(page, 'field-capacitor.capacitance-error'),
      (v) => /capacitance/.test(String(v)),
      "() => text(page, 'field-capacitor.capacitance-error')",
    );
    await shot(page, `${viewport}-05-design-inputs-error`);
    await capacitance.fill('1.5m');
    await until(
      () => page.getByTestId('field-capacitor.capacitance-error').count(),
      (v) => v === 0,
      "() => page.getByTestId('field-capacitor.capacitance-error').",
    );
    await until(
      () => text(page, 'save-state'),
      (v) => v === 'Working copy saved',
      "() => text(page, 'save-state')",
      T,
    );
    await shot(page, `${viewport}-06-design-inputs`);
    await noSidewaysScroll(page);

    // Precharge sizing, then "use this value".
    await page.getByTestId('open-precharge').click();
    await page.getByTestId('precharge-screen').waitFor({ timeout: T });
    await page.getByTestId('candidates').waitFor({ timeout: 60_000 });
    await page.getByTestId('sizing-recommended').waitFor({ timeout: 60_000 });
    await shot(page, `${viewport}-07-precharge-sizing`);
    await noSidewaysScroll(page);
    // "Use this value" on the recommended standard value.
    const chosen = /Recommended: (.+?), the value/.exec(await text(page, 'sizing-recommended'))?.[1] ?? '';
    expect(chosen).toMatch(/Ω$/);
    const usable = page.getByRole('button', { name: `Use ${chosen} in the design` });
    await usable.first().click();
    await page.getByTestId('precharge-applied').waitFor({ timeout: T });
    await shot(page, `${viewport}-08-precharge-applied`);
    await page.getByTestId('open-design-after-apply').click();
    await page.getByTestId('design-screen').waitFor({ timeout: T });
    await showInputs(page, viewport);
    await until(
      () => text(page, 'field-precharge.resistance-parsed'),
      (v) => v === `= ${chosen}`,
      "() => text(page, 'field-precharge.resistance-parsed')",
      T,
    );

    // Save a revision and request a review from Priya.
    await page.getByTestId('save-revision').click();
    await page.getByTestId('revision-note').fill(`Precharge resistor ${chosen} from the sizing window; DC link 1.5 mF.`);
    await page.getByTestId('confirm-save-revision').click();
    await page.getByTestId('revision-saved').waitFor({ timeout: 60_000 });
    expect(await text(page, 'revision-hash')).toMatch(/^[0-9a-f]{12}$/);
    await shot(page, `${viewport}-09-revision-saved`);
    await page.getByTestId('go-request-review').click();
    await page.getByTestId('revisions-screen').waitFor({ timeout: T });
    await page.getByTestId('reviewer-priya@northfold.example').click();
    await page.getByTestId('review-note').fill('Please look at the second inrush when the bypass closes.');
    await shot(page, `${viewport}-10-request-review`);
    await page.getByTestId('submit-review-request').click();
    await page.getByTestId('review-requested').waitFor({ timeout: T });
    expect(await text(page, 'revision-1-sha')).toMatch(/sha256 [0-9a-f]{64}/);
    await shot(page, `${viewport}-11-review-requested`);
    await noSidewaysScroll(page);
    await signOut(page);
    expect(errors).toEqual([]);
    await page.close();
  });

  it('the reviewer finds the e-mail, approves, and downloads a PDF margin report', async () => {
    const page = await browser.newPage(viewport);
    await signIn(page, 'reviewer');
    await page.getByTestId('user-menu-button').click();
    await page.getByRole('menuitem', { name: 'My mail' }).click();
    await page.getByTestId('my-mail-screen').waitFor({ timeout: T });
    const message = page.locator('[data-testid^="mail-"][role="button"]', { hasText: `Review requested: ${designName}` });
    await message.first().waitFor({ timeout: T });
    if ((await message.first().getAttribute('aria-expanded')) !== 'true') await message.first().click();
    await shot(page, `${viewport}-12-my-mail`);
    await noSidewaysScroll(page);
    await page.getByTestId('mail-link-reviews').first().click();
    await page.getByTestId('review-screen').waitFor({ timeout: T });
    await page.getByTestId('checks-table').waitFor({ timeout: T });
    await shot(page, `${viewport}-13-review`);
    await noSidewaysScroll(page);

    // Failures are listed first.
    const statuses = await page
      .locator('[data-testid$="-status"][aria-label^="Status:"]')
      .evaluateAll((els) => els.map((e) => e.getAttribute('aria-label')));
    const rank = (s: string | null) =>
      ({ 'Status: fail': 0, 'Status: warn': 1, 'Status: not checked': 2, 'Status: pass': 3 })[s ?? ''] ?? 9;
    const ranks = statuses.map(rank);
    expect(ranks).toEqual([...ranks].sort((a, b) => a - b));

    await page.getByTestId('approve-comment').fill('Second inrush is inside the contactor making rating.');
    await page.getByTestId('approve').click();
    await until(
      () => text(page, 'review-state'),
      (v) => /approved/.test(String(v)),
      "() => text(page, 'review-state')",
      T,
    );
    await shot(page, `${viewport}-14-approved`);

    const [download] = await Promise.all([
      page.waitForEvent('download', { timeout: 60_000 }),
      page.getByTestId('download-pdf-1').click(),
    ]);
    const file = await download.path();
    const head = fs.readFileSync(file!).subarray(0, 5).toString('latin1');
    expect(head).toBe('%PDF-');
    await page.getByTestId('nav-reviews').or(page.getByTestId('tab-reviews')).first().click();
    await page.getByTestId('reviews-screen').waitFor({ timeout: T });
    await shot(page, `${viewport}-15-reviews`);
    await signOut(page);
    await page.close();
  });

  it('the admin sees the team, the outbox and the audit log', async () => {
    const page = await browser.newPage(viewport);
    await signIn(page, 'admin');
    for (const [section, testId] of [
      ['members', 'members'],
      ['invitations', 'invitations'],
      ['policy', 'policy'],
      ['outbox', 'outbox'],
      ['audit', 'audit'],
    ] as const) {
      await page.goto(`${server.url}/team?section=${section}`);
      await page.getByTestId(testId).waitFor({ timeout: T });
      if (section === 'outbox')
        await page
          .locator('[data-testid^="mail-"]', { hasText: `Review requested: ${designName}` })
          .first()
          .waitFor({ timeout: T });
      await shot(page, `${viewport}-16-team-${section}`);
      await noSidewaysScroll(page);
    }
    await page.goto(`${server.url}/parts`);
    await page.getByTestId('parts-screen').waitFor({ timeout: T });
    await shot(page, `${viewport}-17-parts`);
    await page.close();
  });
});
