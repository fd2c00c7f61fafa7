import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { expectNoProblems, startProduct, type Product } from '../setup/browser';

let product: Product;
beforeAll(async () => {
  product = await startProduct();
});
afterAll(async () => {
  await product?.close();
});

describe('signing in through the local provider', () => {
  it('signs the demo maker in, shows their name in the top bar, and signs out', async () => {
    const { page, problems } = await product.newPage();
    await page.goto('/');
    await page.getByTestId('sign-in').click();
    // The local provider's page lists the demo accounts.
    await page.getByRole('button', { name: /Continue as Ilse Marrow/ }).click();
    await expect.poll(() => page.url()).toBe(`${product.origin}/`);
    await expect.poll(() => page.getByTestId('user-menu').textContent()).toContain('Ilse Marrow');

    await page.getByTestId('user-menu').click();
    await page.getByTestId('sign-out').click();
    await page.getByTestId('sign-in').waitFor();
    const me = await page.evaluate(async () => (await fetch('/api/me')).json());
    expect(me.user).toBeNull();
    expectNoProblems(problems);
  });

  it('lets a new person create an account on the provider page and lands them signed in', async () => {
    const { page, problems } = await product.newPage();
    await page.goto('/');
    await page.getByTestId('sign-in').click();
    await page.getByLabel('Handle').fill('newcomer-7');
    await page.getByLabel('Name').fill('Nell Newcomer');
    await page.getByLabel('E-mail').fill('nell@makers.invalid');
    await page.getByRole('button', { name: 'Create and continue' }).click();
    await expect.poll(() => page.getByTestId('user-menu').textContent()).toContain('Nell Newcomer');
    expectNoProblems(problems);
  });

  it('shows the admin page to the demo admin and a 403 page to the demo maker', async () => {
    const admin = await product.newPage();
    await admin.page.goto(`/api/auth/github?returnTo=${encodeURIComponent('/admin/users')}`);
    await admin.page.getByRole('button', { name: /Continue as Quill Haverford/ }).click();
    await admin.page.getByRole('heading', { name: 'Members and roles' }).waitFor();
    await expect.poll(() => admin.page.locator('tr[data-handle="ilse-marrow"]').count()).toBe(1);
    expectNoProblems(admin.problems);

    const maker = await product.newPage();
    await maker.page.goto(`/api/auth/github?returnTo=${encodeURIComponent('/admin/users')}`);
    await maker.page.getByRole('button', { name: /Continue as Ilse Marrow/ }).click();
    await maker.page.getByTestId('forbidden').waitFor();
    expect(await maker.page.getByTestId('forbidden').textContent()).toContain('403');
    expectNoProblems(maker.problems);
  });
});
