// @vitest-environment happy-dom
/**
 * The curation dialog: merging asks for the target tag (suggested from approved tags, never the tag
 * itself) and a reason, sends exactly `{ into, reason }`, and shows the server's refusal in words.
 */
import '../editor/vuetify-env';
import { mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { nextTick } from 'vue';
import { createVuetify } from 'vuetify';
import TagCurationDialog from '@/components/tags/TagCurationDialog.vue';
import TagPicker from '@/components/tags/TagPicker.vue';
import { fakeApi, json, settle } from '../errata/fake-api';
import { tagSummary } from './fixtures';

const duplicate = tagSummary({ slug: 'read-only-gpio', name: 'read only gpio', state: 'pending', description: '' });
const survivor = tagSummary({ counts: { lessons: 3, errata: 1, projects: 0, total: 4 } });

let wrapper: VueWrapper | null = null;
beforeEach(() => setActivePinia(createPinia()));
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  vi.unstubAllGlobals();
  document.body.innerHTML = '';
});

function mountMerge() {
  wrapper = mount(TagCurationDialog, {
    props: { modelValue: true, action: 'merge', tag: duplicate },
    global: { plugins: [createVuetify()] },
    attachTo: document.body,
  });
  return wrapper;
}

const confirmButton = () => document.querySelector<HTMLButtonElement>('[data-testid="tag-curation-confirm"]')!;
async function typeReason(text: string) {
  const reason = document.querySelector<HTMLTextAreaElement>('[data-testid="tag-curation-reason"] textarea')!;
  reason.value = text;
  reason.dispatchEvent(new Event('input'));
  await nextTick();
}

describe('TagCurationDialog (merge)', () => {
  it('explains that the merged tag becomes an alias', async () => {
    fakeApi({ 'GET /api/tags': json({ items: [], viewer: { canCurate: true } }) });
    mountMerge();
    await settle();
    expect(document.body.textContent).toContain('“read only gpio” becomes another name (an alias) for it');
  });

  it('sends nothing without a target or a reason, then sends { into, reason } and reports the result', async () => {
    const api = fakeApi({
      'GET /api/tags': json({ items: [duplicate, survivor], viewer: { canCurate: true } }),
      'POST /api/tags/read-only-gpio/merge': json({
        tag: { ...duplicate, state: 'pending' },
        mergedInto: 'input-only-pin',
        retagged: { lessons: 1, errata: 0, projects: 0 },
        removed: false,
      }),
    });
    const w = mountMerge();
    await settle();

    confirmButton().click();
    await settle();
    expect(api.writes()).toHaveLength(0);
    expect(document.body.textContent).toContain('Pick the tag to merge into');

    const picker = w.getComponent(TagPicker);
    picker.vm.$emit('update:modelValue', 'input-only-pin');
    await nextTick();
    confirmButton().click();
    await settle();
    expect(api.writes()).toHaveLength(0);

    await typeReason('Same thing under another name.');
    confirmButton().click();
    await settle();

    expect(api.writes()).toEqual([
      {
        method: 'POST',
        url: '/api/tags/read-only-gpio/merge',
        body: { into: 'input-only-pin', reason: 'Same thing under another name.' },
      },
    ]);
    const done = w.emitted('done');
    expect(done).toHaveLength(1);
    expect(done![0]![1]).toBe('merge');
    expect(w.emitted('update:modelValue')?.at(-1)).toEqual([false]);
  });

  it('suggests approved tags only, leaving out the tag being merged', async () => {
    const api = fakeApi({ 'GET /api/tags': json({ items: [duplicate, survivor], viewer: { canCurate: true } }) });
    const w = mountMerge();
    await settle();
    const picker = w.getComponent(TagPicker);
    const autocomplete = picker.getComponent({ name: 'VAutocomplete' });
    autocomplete.vm.$emit('update:search', 'pin');
    await new Promise((resolve) => setTimeout(resolve, 250));
    await settle();
    const query = new URL(api.calls.at(-1)!.url, 'http://x').searchParams;
    expect(query.get('q')).toBe('pin');
    expect(query.get('state')).toBe('approved');
    const items = autocomplete.props('items') as { value: string }[];
    expect(items.map((i) => i.value)).toEqual(['input-only-pin']);
  });

  it('shows a wrong-state refusal from the server in words and keeps the dialog open', async () => {
    fakeApi({
      'GET /api/tags': json({ items: [survivor], viewer: { canCurate: true } }),
      'POST /api/tags/read-only-gpio/merge': json(
        { error: { code: 'conflict', message: 'This tag is already merged into another.' } },
        409,
      ),
    });
    const w = mountMerge();
    await settle();
    w.getComponent(TagPicker).vm.$emit('update:modelValue', 'input-only-pin');
    await typeReason('Duplicate.');
    confirmButton().click();
    await settle();
    expect(document.querySelector('[data-testid="tag-curation-error"]')?.textContent).toContain(
      'This tag is already merged into another.',
    );
    expect(w.emitted('done')).toBeUndefined();
  });
});
