/**
 * A contributor proposes an erratum on a demo project; the owner finds it in the review queue,
 * edits and accepts it; the erratum shows in the table credited to the contributor, whose
 * notification and e-mail arrive (the e-mail through the job queue and the local SMTP capture).
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

async function pick(page: Page, label: string, option: string) {
  // Vuetify's select keeps its input invisible; the visible field around it takes the click.
  const field = page.locator('.v-select').filter({ has: page.getByText(label, { exact: true }) }).first();
  await field.locator('.v-field').click();
  await page.getByRole('option', { name: option }).first().click();
  await page.keyboard.press('Escape');
  await expect.poll(() => field.textContent()).toContain(option);
}

describe('contributing an erratum', () => {
  it('goes from a contributor’s proposal to a credited erratum, with notification and e-mail', async () => {
    // The contributor proposes.
    const bram = await product.newPage();
    await signInAs(bram.page, 'Bram Tolliver', '/projects/tide-clock');
    await bram.page.getByTestId('propose-erratum').click();
    await bram.page.getByLabel('Title').fill('Servo hums at the end of travel');
    await pick(bram.page, 'Category', 'Mechanical');
    await pick(bram.page, 'Severity', 'Minor');
    await pick(bram.page, 'Affected board revisions', 'Rev B');
    await bram.page.getByRole('textbox', { name: 'Symptom' }).click();
    await bram.page.keyboard.type('The hand buzzes at high water for a few seconds.');
    await bram.page.getByRole('button', { name: 'Send the proposal' }).click();
    await bram.page.getByTestId('status').filter({ hasText: /open/i }).waitFor();
    const proposalUrl = bram.page.url();
    expect(proposalUrl).toMatch(/\/proposals\/\d+$/);

    // The owner reviews it from the queue, edits the title, and accepts.
    const owner = await product.newPage();
    await signInAs(owner.page, 'Juniper Okoye', '/me/review');
    await owner.page.getByRole('link', { name: /Servo hums at the end of travel/ }).click();
    await owner.page.getByTestId('edit-accept').click();
    const title = owner.page.getByLabel('Title');
    await title.fill('Servo hums at the end of travel (high water)');
    await owner.page.getByTestId('accept-edited').click();
    await owner.page.getByTestId('result-link').click();
    await expect.poll(() => owner.page.url()).toMatch(/\/projects\/tide-clock\/errata\/E\d+$/);
    await owner.page.getByRole('heading', { name: /Servo hums at the end of travel \(high water\)/ }).waitFor();
    // Credited to the contributor on the erratum page.
    await owner.page.locator('main').getByText('Bram Tolliver').first().waitFor();

    // The errata table lists it.
    await owner.page.goto('/projects/tide-clock/errata');
    await owner.page.getByText('Servo hums at the end of travel (high water)').first().waitFor();

    // The contributor's notification arrives in the app …
    await bram.page.reload();
    await expect
      .poll(async () => {
        const res = await bram.page.evaluate(async () => (await fetch('/api/me/notifications')).json());
        return (res.items as { kind: string; payload: { decision?: string } }[]).some(
          (n) => n.kind === 'proposal_decided' && n.payload.decision === 'accepted',
        );
      })
      .toBe(true);
    // … and by e-mail, through the queue to the local SMTP capture.
    const outbox = product.server.ctx.outbox!;
    await expect
      .poll(() => outbox.messages().some((m) => m.to.includes('bram@makers.invalid') && /accepted/i.test(m.subject)), { timeout: 30_000 })
      .toBe(true);

    expectNoProblems(bram.problems);
    expectNoProblems(owner.problems);
  });
});
