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

async function documentBody(slug: string, title: string): Promise<string> {
  const res = await fetch(`${product.origin}/api/projects/${slug}`);
  const detail = (await res.json()) as { sections: { id: number; title: string }[] };
  const section = detail.sections.find((s) => s.title === title)!;
  const doc = (await (await fetch(`${product.origin}/api/projects/${slug}/documents/${section.id}`)).json()) as { body: string };
  return doc.body;
}

describe('writing up a build', () => {
  it('creates a project, writes a section with a heading, a list and a table, edits it, diffs and restores', async () => {
    const { page, problems } = await product.newPage();
    await signInAs(page, 'Ilse Marrow', '/new');

    await page.getByLabel('Title').fill('Kiln Temperature Logger');
    await page.getByLabel('One-line summary').fill('Thermocouple logger for a small ceramics kiln.');
    await page.getByRole('button', { name: 'Create draft' }).click();
    await page.getByTestId('project-title').filter({ hasText: 'Kiln Temperature Logger' }).waitFor();
    await page.getByTestId('toggle-published').click();
    await page.getByTestId('toggle-published').filter({ hasText: 'Unpublish' }).waitFor();

    // Write the Overview in the rich editor: a heading, a bulleted list and a table.
    await page.getByRole('link', { name: 'Edit Overview' }).click();
    const editor = page.getByRole('textbox', { name: 'Text of Overview' });
    await editor.click();
    await page.keyboard.type('## Wiring');
    await page.keyboard.press('Enter');
    await page.keyboard.type('- thermocouple amplifier on the SPI bus');
    await page.keyboard.press('Enter');
    await page.keyboard.type('relay on D7');
    await page.keyboard.press('Enter');
    await page.keyboard.press('Enter');
    await page.getByRole('button', { name: /Insert table/ }).click();
    await page.keyboard.type('Pin');
    await page.keyboard.press('Tab');
    await page.keyboard.type('Signal');
    await page.getByTestId('save').click();
    await expect.poll(() => documentBody('kiln-temperature-logger', 'Overview')).toMatch(/## Wiring/);
    const first = await documentBody('kiln-temperature-logger', 'Overview');
    expect(first).toContain('- thermocouple amplifier on the SPI bus');
    expect(first).toContain('- relay on D7');
    expect(first).toMatch(/\|\s*Pin\s*\|\s*Signal\s*\|/);

    // Edit again: rename the heading.
    await editor.getByText('Wiring').click();
    await page.keyboard.press('End');
    await page.keyboard.type(' and power');
    await page.getByTestId('save').click();
    await expect.poll(() => documentBody('kiln-temperature-logger', 'Overview')).toContain('## Wiring and power');

    // History: the newest revision against its parent shows the change.
    await page.getByRole('link', { name: 'History' }).first().click();
    await page.getByRole('heading', { name: /History/ }).first().waitFor();
    const diff = page.locator('ins', { hasText: 'and power' }).first();
    await diff.waitFor();

    // Restore the first written version (revision 2; revision 1 is the empty section).
    const restoreButtons = page.getByRole('button', { name: /Restore this version/ });
    await restoreButtons.first().waitFor();
    const count = await restoreButtons.count();
    // The list is newest first: #3 (current, no button), #2, #1 — restore #2.
    expect(count).toBe(2);
    await restoreButtons.first().click();
    await page.getByTestId('confirm-restore').click();
    await expect.poll(() => documentBody('kiln-temperature-logger', 'Overview')).toBe(first);
    expectNoProblems(problems);
  });
});
