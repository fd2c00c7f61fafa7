/**
 * A moderator cleans up the tag vocabulary: the demo moderator opens the pending tags, merges the
 * duplicate a member created ("adc only pin") into the approved tag it duplicates ("Analog-only
 * pin"), sees the lesson carrying the surviving tag, follows the old tag's address to the surviving
 * tag's page, and finds the merge in the audit log.
 */
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { expectNoProblems, startProduct, type Product } from '../setup/browser';

let product: Product;
beforeAll(async () => {
  product = await startProduct();
});
afterAll(async () => {
  await product?.close();
});

async function signInAs(page: Page, name: string, returnTo: string) {
  await page.goto(`/api/auth/github?returnTo=${encodeURIComponent(returnTo)}`);
  await page.getByRole('button', { name: new RegExp(`Continue as ${name}`) }).click();
}

describe('tag curation', () => {
  it('merges a duplicate tag: its lesson carries the survivor, its old address redirects, the audit log has it', async () => {
    const { page, problems } = await product.newPage();
    await signInAs(page, 'Odile Fenwick', '/moderation/tags');

    // The pending duplicate, created by a member on a lesson of the greenhouse project.
    const pending = page.locator('[data-tag="adc-only-pin"]');
    await pending.waitFor();
    expect(await pending.getAttribute('data-tag-state')).toBe('pending');
    await pending.getByTestId('merge').click();

    const dialog = page.getByTestId('tag-curation-dialog');
    await dialog.getByText('becomes another name (an alias) for it').waitFor();
    await dialog.getByRole('combobox', { name: /Merge into/ }).fill('analog');
    await page.getByRole('option', { name: /Analog-only pin/ }).click();
    await dialog.getByLabel(/^Reason/).fill('Same pins under another name.');
    await dialog.getByTestId('tag-curation-confirm').click();
    await expect
      .poll(() => page.getByTestId('curation-result').textContent())
      .toContain('“adc only pin” was merged into “analog-only-pin”');
    await expect.poll(() => page.locator('[data-tag="adc-only-pin"]').count()).toBe(0);

    // The lesson that carried the duplicate now shows the surviving tag, linked to its page.
    await page.goto('/projects/greenhouse-vent-controller');
    const lesson = page.locator('.project-lessons__item').filter({ hasText: 'compiles without a warning' });
    await lesson.waitFor();
    const chip = lesson.locator('[data-tag-state]');
    await expect.poll(() => chip.allTextContents()).toEqual([expect.stringContaining('Analog-only pin')]);
    expect(await chip.first().getAttribute('href')).toBe('/tags/analog-only-pin');

    // The old address leads to the surviving tag, saying why.
    await page.goto('/tags/adc-only-pin');
    await expect.poll(() => new URL(page.url()).pathname).toBe('/tags/analog-only-pin');
    await expect
      .poll(() => page.getByTestId('tag-redirect-note').textContent())
      .toBe('“adc-only-pin” was merged into “Analog-only pin”.');
    await expect.poll(() => page.getByTestId('tag-name').textContent()).toContain('Analog-only pin');
    expect(await page.locator('link[rel="alternate"][type="application/atom+xml"]').getAttribute('href')).toMatch(
      /\/api\/feeds\/tags\/analog-only-pin\.atom$/,
    );

    // The audit log records who merged what, and why.
    await page.goto('/moderation/audit');
    const entry = page.locator('[data-action="tag.merge"]').first();
    await entry.waitFor();
    const text = await entry.textContent();
    expect(text).toContain('Odile Fenwick');
    expect(text).toContain('merged a tag into another');
    expect(text).toContain('Same pins under another name.');

    expectNoProblems(problems);
  });
});
