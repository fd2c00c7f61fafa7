// @vitest-environment happy-dom
/**
 * The resolution view after a 409 `edit_conflict`: the writer picks per region and per value, and
 * the fields it emits are exactly the document they chose, based on the revision stored now.
 */
import './vuetify-env';
import type { EditConflict } from '@shared/contracts/projects';
import { mount, type VueWrapper } from '@vue/test-utils';
import { afterEach, describe, expect, it } from 'vitest';
import { nextTick } from 'vue';
import { createVuetify } from 'vuetify';
import ConflictResolver from '@/components/editor/ConflictResolver.vue';

// An invented log entry. Base (revision 4):
//   ## Bring-up / The regulator runs warm. / Check the 3.3 V rail. / Fit the heatsink. / Log it.
// Someone else saved revision 5 changing lines 2 and 5; this writer changed the same two lines.
const conflict: EditConflict = {
  baseRevision: 4,
  current: {
    revision: 5,
    fields: {
      title: 'Rev B bring-up, day 2',
      body: '## Bring-up\nThe regulator runs hot at 450 mA.\nCheck the 3.3 V rail.\nFit the heatsink.\nLog the draw.\n',
      loggedOn: '2026-03-14',
    },
    author: { id: 7, handle: 'wren-okafor', displayName: 'Wren Okafor', avatarUrl: null },
    createdAt: '2026-03-14T18:20:00.000Z',
  },
  chunks: {
    body: [
      { kind: 'stable', text: '## Bring-up\n' },
      {
        kind: 'conflict',
        id: 'conflict-1',
        ours: 'The regulator runs warm at 300 mA.\n',
        base: 'The regulator runs warm.\n',
        theirs: 'The regulator runs hot at 450 mA.\n',
        lines: { ours: 2, base: 2, theirs: 2 },
      },
      { kind: 'stable', text: 'Check the 3.3 V rail.\nFit the heatsink.\n' },
      {
        kind: 'conflict',
        id: 'conflict-2',
        ours: 'Log the current.\n',
        base: 'Log it.\n',
        theirs: 'Log the draw.\n',
        lines: { ours: 5, base: 5, theirs: 5 },
      },
    ],
  },
  fieldConflicts: [
    { field: 'title', base: 'Rev B bring-up', ours: 'Rev B bring-up, first power', theirs: 'Rev B bring-up, day 2' },
  ],
  merged: {
    title: 'Rev B bring-up, day 2',
    body: '## Bring-up\nThe regulator runs hot at 450 mA.\nCheck the 3.3 V rail.\nFit the heatsink.\nLog the draw.\n',
    loggedOn: '2026-03-15',
  },
};

const ours = {
  title: 'Rev B bring-up, first power',
  body: '## Bring-up\nThe regulator runs warm at 300 mA.\nCheck the 3.3 V rail.\nFit the heatsink.\nLog the current.\n',
  loggedOn: '2026-03-15',
};

let wrapper: VueWrapper | null = null;

afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  document.body.innerHTML = '';
});

function mountResolver(props: { conflict?: EditConflict; ours?: Record<string, string | null> } = {}) {
  wrapper = mount(ConflictResolver, {
    props: { conflict, ours, ...props },
    global: { plugins: [createVuetify()] },
    attachTo: document.body,
  });
  return wrapper;
}

async function choose(scope: string, label: string) {
  const root = document.querySelector<HTMLElement>(scope);
  if (!root) throw new Error(`nothing matches ${scope}`);
  const radio = [...root.querySelectorAll<HTMLInputElement>('input[type="radio"]')].find((input) =>
    root.querySelector(`label[for="${input.id}"]`)?.textContent?.trim().startsWith(label),
  );
  if (!radio) throw new Error(`no "${label}" choice in ${scope}`);
  radio.click();
  await nextTick();
}

const useButton = () =>
  [...document.querySelectorAll<HTMLButtonElement>('button')].find((b) =>
    b.textContent?.includes('Use this resolution'),
  )!;

function resolution(w: VueWrapper) {
  const events = w.emitted('resolved');
  expect(events).toHaveLength(1);
  return events![0]![0] as { fields: Record<string, string | null>; baseRevision: number };
}

describe('ConflictResolver', () => {
  it('shows both versions of each overlap, with who saved theirs', () => {
    mountResolver();
    const first = document.querySelector('[data-conflict="conflict-1"]')!;
    expect(first.textContent).toContain('The regulator runs hot at 450 mA.');
    expect(first.textContent).toContain('The regulator runs warm at 300 mA.');
    expect(first.textContent).toContain('Wren Okafor');
    expect(document.querySelector('[data-field="body"]')!.textContent).toContain('Check the 3.3 V rail.');
  });

  it('keeps "Use this resolution" off until every overlap and value has a choice', async () => {
    mountResolver();
    expect(useButton().disabled).toBe(true);
    await choose('[data-conflict="conflict-1"]', 'Keep mine');
    await choose('[data-conflict="conflict-2"]', 'Keep theirs');
    expect(useButton().disabled).toBe(true);
    await choose('[data-field="title"]', 'Mine');
    expect(useButton().disabled).toBe(false);
  });

  it('rebuilds the text from the choices and keeps the merged fields, based on the revision stored now', async () => {
    const w = mountResolver();
    await choose('[data-conflict="conflict-1"]', 'Keep mine');
    await choose('[data-conflict="conflict-2"]', 'Keep theirs');
    await choose('[data-field="title"]', 'Theirs');
    useButton().click();
    expect(resolution(w)).toEqual({
      baseRevision: 5,
      fields: {
        title: 'Rev B bring-up, day 2',
        body: '## Bring-up\nThe regulator runs warm at 300 mA.\nCheck the 3.3 V rail.\nFit the heatsink.\nLog the draw.\n',
        loggedOn: '2026-03-15',
      },
    });
  });

  it('"keep both" puts mine above theirs', async () => {
    const w = mountResolver();
    await choose('[data-conflict="conflict-1"]', 'Keep both');
    await choose('[data-conflict="conflict-2"]', 'Keep mine');
    await choose('[data-field="title"]', 'Mine');
    useButton().click();
    const { fields } = resolution(w);
    expect(fields.body).toBe(
      '## Bring-up\nThe regulator runs warm at 300 mA.\nThe regulator runs hot at 450 mA.\nCheck the 3.3 V rail.\nFit the heatsink.\nLog the current.\n',
    );
    expect(fields.title).toBe('Rev B bring-up, first power');
  });

  it('"edit" starts from both versions and uses the edited text', async () => {
    const w = mountResolver();
    await choose('[data-conflict="conflict-1"]', 'Edit');
    const textarea = document.querySelector<HTMLTextAreaElement>('[data-conflict="conflict-1"] textarea')!;
    expect(textarea.value).toBe('The regulator runs warm at 300 mA.\nThe regulator runs hot at 450 mA.\n');
    textarea.value = 'The regulator runs hot above 400 mA.';
    textarea.dispatchEvent(new Event('input'));
    await choose('[data-conflict="conflict-2"]', 'Keep mine');
    await choose('[data-field="title"]', 'Something else');
    const title = document.querySelector<HTMLInputElement>('[data-field="title"] input[type="text"]')!;
    title.value = 'Rev B bring-up';
    title.dispatchEvent(new Event('input'));
    await nextTick();
    useButton().click();
    const { fields } = resolution(w);
    expect(fields.body).toBe(
      '## Bring-up\nThe regulator runs hot above 400 mA.\nCheck the 3.3 V rail.\nFit the heatsink.\nLog the current.\n',
    );
    expect(fields.title).toBe('Rev B bring-up');
  });

  it('keeps the text typed under "edit" when the writer tries another choice and comes back', async () => {
    mountResolver();
    await choose('[data-conflict="conflict-1"]', 'Edit');
    const textarea = () => document.querySelector<HTMLTextAreaElement>('[data-conflict="conflict-1"] textarea');
    textarea()!.value = 'My careful rewrite';
    textarea()!.dispatchEvent(new Event('input'));
    await choose('[data-conflict="conflict-1"]', 'Keep theirs');
    expect(textarea()).toBeNull();
    await choose('[data-conflict="conflict-1"]', 'Edit');
    expect(textarea()!.value).toBe('My careful rewrite');
  });

  it('still shows the writer\'s own text after "keep theirs"', async () => {
    mountResolver();
    await choose('[data-conflict="conflict-1"]', 'Keep theirs');
    expect(document.querySelector('[data-conflict="conflict-1"]')!.textContent).toContain(
      'The regulator runs warm at 300 mA.',
    );
    const full = document.querySelector<HTMLTextAreaElement>('.conflict-resolver__full textarea')!;
    expect(full.value).toBe(ours.body);
  });

  it('emits cancel when the writer goes back to editing', () => {
    const w = mountResolver();
    [...document.querySelectorAll<HTMLButtonElement>('button')]
      .find((b) => b.textContent?.includes('Back to editing'))!
      .click();
    expect(w.emitted('cancel')).toHaveLength(1);
    expect(w.emitted('resolved')).toBeUndefined();
  });
});
