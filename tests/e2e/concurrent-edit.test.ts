/**
 * Two people edit the same section in two browsers at once: non-overlapping edits merge with
 * a notice; overlapping ones open the resolution view, where nothing typed is lost.
 */
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createProject, setPublished, addEditor } from '../../api/projects/service';
import { findProjectBySlug } from '../../api/projects/queries';
import { saveDocument } from '../../api/documents/service';
import { findUserByHandle } from '../../api/users/queries';
import { toAuthUser } from '../../api/users/service';
import { expectNoProblems, startProduct, type Product } from '../setup/browser';

let product: Product;
let slug: string;
let sectionId: number;

beforeAll(async () => {
  product = await startProduct();
  const ctx = product.server.ctx;
  const ilse = toAuthUser((await findUserByHandle(ctx.db, 'ilse-marrow'))!);
  const created = await createProject(ctx, ilse, { title: 'Shared Bench Notes', summary: '', licence: 'MIT', hazards: [] });
  slug = created.slug;
  const project = (await findProjectBySlug(ctx.db, slug))!;
  await addEditor(ctx, ilse, project, 'juniper-okoye');
  sectionId = created.sections[0]!.id;
  await saveDocument(
    ctx,
    ilse,
    project,
    'owner',
    sectionId,
    { title: 'Overview', body: 'First paragraph.\n\nMiddle paragraph.\n\nLast paragraph.\n', loggedOn: null, message: 'start' },
    1,
  );
  await setPublished(ctx, ilse, project, 'owner', true);
});

afterAll(async () => {
  await product?.close();
});

async function openEditor(name: string) {
  const opened = await product.newPage();
  const { page } = opened;
  await page.goto(`/api/auth/github?returnTo=${encodeURIComponent(`/projects/${slug}/documents/${sectionId}/edit`)}`);
  await page.getByRole('button', { name: new RegExp(`Continue as ${name}`) }).click();
  await page.getByRole('textbox', { name: 'Text of Overview' }).waitFor();
  return opened;
}

async function appendTo(page: Page, paragraph: string, text: string) {
  await page.getByRole('textbox', { name: 'Text of Overview' }).getByText(paragraph).click();
  await page.keyboard.press('End');
  await page.keyboard.type(text);
}

async function currentBody(): Promise<{ body: string; revision: number }> {
  const res = await fetch(`${product.origin}/api/projects/${slug}/documents/${sectionId}`);
  return (await res.json()) as { body: string; revision: number };
}

describe('two people editing one section at once', () => {
  it('merges edits that do not overlap and resolves those that do, losing nothing', async () => {
    const a = await openEditor('Ilse Marrow');
    const b = await openEditor('Juniper Okoye');

    // Both started from revision 2. A edits the first paragraph and saves.
    await appendTo(a.page, 'First paragraph.', ' Edited in tab A.');
    await a.page.getByTestId('save').click();
    await expect.poll(async () => (await currentBody()).revision).toBe(3);

    // B, still on revision 2, edits the last paragraph: merged, with a notice.
    await appendTo(b.page, 'Last paragraph.', ' Edited in tab B.');
    await b.page.getByTestId('save').click();
    await b.page.getByText(/merged with revision 3/).waitFor();
    expect((await currentBody()).body.trimEnd()).toBe('First paragraph. Edited in tab A.\n\nMiddle paragraph.\n\nLast paragraph. Edited in tab B.');

    // Now both change the middle paragraph. A saves first (A is on revision 3, the merge made 4).
    await a.page.reload();
    await a.page.getByRole('textbox', { name: 'Text of Overview' }).waitFor();
    await appendTo(a.page, 'Middle paragraph.', ' Version A.');
    await a.page.getByTestId('save').click();
    await expect.poll(async () => (await currentBody()).revision).toBe(5);

    await appendTo(b.page, 'Middle paragraph.', ' Version B.');
    await b.page.getByTestId('save').click();
    // The resolution view shows both versions of the clashing paragraph; B keeps both.
    const resolver = b.page.getByRole('region', { name: 'Your changes overlap with a newer save' });
    await resolver.waitFor();
    expect(await resolver.textContent()).toContain('Version A.');
    expect(await resolver.textContent()).toContain('Version B.');
    await resolver.getByRole('radio', { name: /Keep both/ }).first().check();
    await resolver.getByRole('button', { name: /Use this resolution/ }).click();
    await expect.poll(async () => (await currentBody()).revision).toBe(6);
    const final = (await currentBody()).body;
    expect(final).toContain('Version A.');
    expect(final).toContain('Version B.');
    expect(final).toContain('Edited in tab A.');
    expect(final).toContain('Edited in tab B.');

    // Every save is in the history.
    const history = (await (await fetch(`${product.origin}/api/projects/${slug}/documents/${sectionId}/revisions`)).json()) as {
      items: { number: number; origin: string }[];
    };
    expect(history.items.map((r) => r.number)).toEqual([6, 5, 4, 3, 2, 1]);
    expect(history.items.find((r) => r.number === 4)?.origin).toBe('merge');
    expectNoProblems(a.problems);
    expectNoProblems(b.problems, { expectedStatuses: [409] });
  });
});
