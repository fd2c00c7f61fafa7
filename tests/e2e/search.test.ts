/**
 * Searching the demo projects in Chromium: from the top bar to an erratum with the keyboard alone,
 * and the search page's filters kept in a link that opens the same results in a fresh browser.
 */
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { indexPending } from '../../api/search/indexer';
import { expectNoProblems, startProduct, type Product } from '../setup/browser';

let product: Product;
beforeAll(async () => {
  product = await startProduct();
  // The demo data is queued for the index when it is seeded; build the index now rather than wait for a poll.
  await indexPending(product.server.ctx);
});
afterAll(async () => {
  await product?.close();
});

const searchBox = (page: Page) => page.getByRole('combobox', { name: 'Search known mistakes' });

/** The text of the option the field points at with aria-activedescendant. */
async function highlighted(page: Page): Promise<string> {
  const id = await searchBox(page).getAttribute('aria-activedescendant');
  expect(id, 'an option is highlighted').toBeTruthy();
  return (await page.locator(`[id="${id}"]`).textContent()) ?? '';
}

async function resultSeverities(page: Page): Promise<string[]> {
  return page
    .locator('[data-testid="search-results"] article')
    .evaluateAll((items) => items.map((item) => (item as HTMLElement).dataset.severity ?? 'none'));
}

async function resultLinks(page: Page): Promise<string[]> {
  return page
    .getByTestId('search-result-link')
    .evaluateAll((links) => links.map((a) => `${a.textContent?.trim()} → ${a.getAttribute('href')}`));
}

describe('search', () => {
  it('goes from a typed pin label to the erratum with ArrowDown and Enter, from the top bar', async () => {
    const { page, problems } = await product.newPage();
    await page.goto('/');
    await page.getByRole('heading', { level: 1 }).first().waitFor();

    // "/" from the page jumps to the field.
    await page.keyboard.press('/');
    await expect.poll(() => searchBox(page).evaluate((el) => el === document.activeElement)).toBe(true);
    await page.keyboard.type('analog only pin');
    const list = page.getByRole('listbox');
    await list.getByRole('option', { name: /E1 Relay never switches/ }).waitFor();
    expect(await searchBox(page).getAttribute('aria-expanded')).toBe('true');
    expect(await searchBox(page).getAttribute('aria-controls')).toBe(await list.getAttribute('id'));

    await page.keyboard.press('ArrowDown');
    expect(await highlighted(page)).toContain('E1 Relay never switches');
    await page.keyboard.press('Enter');
    await page.waitForURL('**/projects/greenhouse-vent-controller/errata/E1');
    await page.getByTestId('erratum-title').filter({ hasText: 'Relay never switches' }).waitFor();
    expect(await searchBox(page).inputValue()).toBe('');

    // Typed slowly against a slow server, each pause starts a request the next key aborts.
    await page.route('**/api/search?*', async (route) => {
      await new Promise((resolve) => setTimeout(resolve, 400));
      await route.continue().catch(() => undefined);
    });
    const aborted: string[] = [];
    page.on('requestfailed', (request) => {
      if (request.failure()?.errorText === 'net::ERR_ABORTED')
        aborted.push(new URL(request.url()).searchParams.get('q')!);
    });
    await searchBox(page).click();
    await page.keyboard.type('GPIO35', { delay: 260 });
    await list.getByRole('option', { name: /GPIO35 is input only/ }).waitFor();
    expect(aborted.length, 'superseded requests were aborted').toBeGreaterThan(0);
    expect(aborted).not.toContain('GPIO35');
    await page.keyboard.press('ArrowDown');
    expect(await highlighted(page)).toContain('GPIO35 is input only');
    await page.keyboard.press('Enter');
    await page.waitForURL('**/projects/tide-clock/errata/E1');
    await page.getByTestId('erratum-title').filter({ hasText: 'GPIO35' }).waitFor();
    await page.unroute('**/api/search?*');

    // Escape closes the list and keeps the words.
    await searchBox(page).click();
    await page.keyboard.type('regulator hot');
    await list.getByRole('option').first().waitFor();
    await page.keyboard.press('Escape');
    expect(await searchBox(page).getAttribute('aria-expanded')).toBe('false');
    expect(await searchBox(page).inputValue()).toBe('regulator hot');

    expectNoProblems(problems);
  });

  it('filters the search page by a severity chip, keeps it in the address, and opens the same results from that link', async () => {
    const { page, problems } = await product.newPage();
    await page.goto('/');
    await searchBox(page).click();
    await page.keyboard.type('pin');
    await page.getByRole('listbox').getByRole('option').first().waitFor();
    // Enter with nothing highlighted opens the search page for the words.
    await page.keyboard.press('Enter');
    await page.waitForURL((url) => url.pathname === '/search' && url.searchParams.get('q') === 'pin');
    await page.getByTestId('search-total').filter({ hasText: '“pin”' }).waitFor();
    expect(await resultSeverities(page)).toContain('none');

    const severity = page.getByRole('group', { name: 'Severity' });
    await severity.getByRole('button', { name: /^Critical/ }).click();
    await page.waitForURL((url) => url.searchParams.getAll('severity').join() === 'critical');
    await expect
      .poll(async () => {
        const all = await resultSeverities(page);
        return all.length > 0 && all.every((s) => s === 'critical');
      })
      .toBe(true);
    expect(await severity.getByRole('button', { name: /^Critical/ }).getAttribute('aria-pressed')).toBe('true');
    await page.getByRole('group', { name: 'Chosen filters' }).getByText('Severity: Critical').waitFor();
    const filtered = await resultLinks(page);
    const shared = page.url();
    expect(new URL(shared).searchParams.get('q')).toBe('pin');

    // A fresh browser profile opening the link sees the same filtered results, here on a phone.
    const fresh = await product.newPage();
    await fresh.page.setViewportSize({ width: 390, height: 844 });
    await fresh.page.goto(shared);
    await fresh.page.getByTestId('search-total').filter({ hasText: '“pin”' }).waitFor();
    await expect.poll(() => resultLinks(fresh.page)).toEqual(filtered);
    expect(new Set(await resultSeverities(fresh.page))).toEqual(new Set(['critical']));
    // On a phone the facets fold behind "Filters".
    const filters = fresh.page.getByRole('button', { name: 'Filters (1 chosen)' });
    await filters.waitFor();
    expect(await fresh.page.getByRole('group', { name: 'Severity' }).isVisible()).toBe(false);
    await filters.click();
    await fresh.page.getByRole('group', { name: 'Severity' }).waitFor();

    expectNoProblems(problems);
    expectNoProblems(fresh.problems);
  });
});
