// @vitest-environment happy-dom
import { mount, type VueWrapper } from '@vue/test-utils';
import type { RevisionSummary } from '@shared/contracts/projects';
import { afterEach, describe, expect, it, vi } from 'vitest';
import type { FunctionalComponent } from 'vue';
import { createVuetify } from 'vuetify';
import RevisionList from '@/components/history/RevisionList.vue';

type StubContext = Parameters<FunctionalComponent>[1];

// Vuetify's component modules import their stylesheets, which Node cannot load while the unit
// project keeps vuetify external; these stand-ins keep the contract the list relies on (slots,
// v-model, click) so the list's own behaviour is what the tests exercise.
vi.mock('vuetify/components/VBtn', async () => {
  const { h } = await import('vue');
  const VBtn = (props: { disabled?: boolean }, { slots, emit, attrs }: StubContext) =>
    h(
      'button',
      { ...attrs, type: 'button', disabled: props.disabled, onClick: (e: Event) => emit('click', e) },
      slots.default?.(),
    );
  return { VBtn: Object.assign(VBtn, { props: ['disabled', 'loading'], emits: ['click'] }) };
});
vi.mock('vuetify/components/VChip', async () => {
  const { h } = await import('vue');
  return { VChip: (_: unknown, { slots, attrs }: StubContext) => h('span', attrs, slots.default?.()) };
});
vi.mock('vuetify/components/VDialog', async () => {
  const { h } = await import('vue');
  const VDialog = (props: { modelValue?: boolean }, { slots }: StubContext) =>
    props.modelValue ? h('div', { role: 'dialog' }, slots.default?.()) : null;
  return { VDialog: Object.assign(VDialog, { props: ['modelValue'] }) };
});
vi.mock('vuetify/components/VCard', async () => {
  const { h } = await import('vue');
  const VCard = (props: { title?: string }, { slots, attrs }: StubContext) =>
    h('div', attrs, [h('h2', props.title), slots.default?.()]);
  const passThrough = (_: unknown, { slots, attrs }: StubContext) => h('div', attrs, slots.default?.());
  return { VCard: Object.assign(VCard, { props: ['title'] }), VCardText: passThrough, VCardActions: passThrough };
});
vi.mock('vuetify/components/VGrid', async () => {
  const { h } = await import('vue');
  return { VSpacer: () => h('span') };
});
vi.mock('vuetify/components/VTextField', async () => {
  const { h } = await import('vue');
  const VTextField = (props: { modelValue?: string; label?: string }, { emit }: StubContext) =>
    h('label', [
      props.label,
      h('input', {
        value: props.modelValue,
        onInput: (e: Event) => emit('update:modelValue', (e.target as HTMLInputElement).value),
      }),
    ]);
  return { VTextField: Object.assign(VTextField, { props: ['modelValue', 'label'], emits: ['update:modelValue'] }) };
});

const maker = { id: 1, handle: 'odile-fenn', displayName: 'Odile Fenn', avatarUrl: null };
const helper = { id: 2, handle: 'bram-ostrander', displayName: 'Bram Ostrander', avatarUrl: null };

function revision(number: number, over: Partial<RevisionSummary> = {}): RevisionSummary {
  return {
    number,
    parentNumber: number > 1 ? number - 1 : null,
    author: maker,
    creditedTo: null,
    message: '',
    contentHash: `${number}f3c9a1b2d4e5f60718293a4b5c6d7e8f9`,
    origin: 'edit',
    createdAt: `2026-03-0${number}T10:00:00.000Z`,
    ...over,
  };
}

const revisions: RevisionSummary[] = [
  revision(5, { origin: 'restore', message: 'Restored revision 2', parentNumber: 4 }),
  revision(4, { origin: 'proposal', author: maker, creditedTo: helper, message: 'Note the warm LDO' }),
  revision(3, { origin: 'merge', message: 'Add the rail check' }),
  revision(2, { origin: 'resolve' }),
  revision(1, { origin: 'create', message: 'First draft' }),
];

let wrapper: VueWrapper | null = null;
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
});

function mountList(props: Partial<InstanceType<typeof RevisionList>['$props']> = {}) {
  wrapper = mount(RevisionList, {
    props: { revisions, from: 4, to: 5, canRestore: true, ...props },
    global: { plugins: [createVuetify()] },
  });
  return wrapper;
}

const item = (w: VueWrapper, number: number) => w.find(`li[data-number="${number}"]`);

describe('RevisionList', () => {
  it('names how each revision came about in our own words', () => {
    const w = mountList();
    expect(w.findAll('[data-testid="origin"]').map((chip) => chip.text())).toEqual([
      'restored from #2',
      'accepted proposal',
      'merged with a concurrent edit',
      'conflict resolved',
      'created',
    ]);
  });

  it('shows the number, author with handle, message, short hash and a machine-readable time', () => {
    const w = mountList();
    const row = item(w, 3);
    expect(row.find('.revision-list__number').text()).toBe('#3');
    expect(row.text()).toContain('Odile Fenn');
    expect(row.text()).toContain('@odile-fenn');
    expect(row.find('.revision-list__message').text()).toBe('Add the rail check');
    expect(row.find('.revision-list__hash').text()).toBe('content hash 3f3c9a1b');
    expect(row.find('time').attributes('datetime')).toBe('2026-03-03T10:00:00.000Z');
    expect(item(w, 2).find('.revision-list__message').text()).toBe('No message');
  });

  it('credits the contributor of an accepted proposal', () => {
    const w = mountList();
    expect(item(w, 4).find('[data-testid="credit"]').text()).toBe(
      'from a proposal by Bram Ostrander (@bram-ostrander)',
    );
    expect(item(w, 3).find('[data-testid="credit"]').exists()).toBe(false);
  });

  it('checks the picked revisions and reports new picks for either side', async () => {
    const w = mountList();
    const checked = (testid: string) =>
      w
        .findAll(`[data-testid="${testid}"]`)
        .filter((input) => (input.element as HTMLInputElement).checked)
        .map((input) => (input.element as HTMLInputElement).value);
    expect(checked('pick-from')).toEqual(['4']);
    expect(checked('pick-to')).toEqual(['5']);

    await item(w, 1).find('[data-testid="pick-from"]').setValue(true);
    await item(w, 3).find('[data-testid="pick-to"]').setValue(true);
    expect(w.emitted('update:from')).toEqual([[1]]);
    expect(w.emitted('update:to')).toEqual([[3]]);
  });

  it('labels every radio button with the side and the revision', () => {
    const w = mountList();
    const labels = item(w, 2)
      .findAll('label')
      .map((label) => label.text());
    expect(labels).toEqual(['Compare from revision #2', 'Compare to revision #2']);
  });

  it('offers restore to editors on every revision but the current one', () => {
    const w = mountList();
    expect(w.findAll('[data-testid="restore"]')).toHaveLength(4);
    expect(item(w, 5).find('[data-testid="restore"]').exists()).toBe(false);
    expect(mountList({ canRestore: false }).findAll('[data-testid="restore"]')).toHaveLength(0);
  });

  it('asks for confirmation, explaining that a new revision is created, before asking to restore', async () => {
    const w = mountList();
    await item(w, 2).find('[data-testid="restore"]').trigger('click');
    const dialog = w.find('[data-testid="restore-dialog"]');
    expect(dialog.find('h2').text()).toBe('Restore revision #2?');
    expect(dialog.text()).toContain('as a new revision on top of the current one (#5)');
    expect(dialog.text()).toContain('No revision is changed or removed');
    expect(w.emitted('restore')).toBeUndefined();

    await dialog.find('input').setValue('  Back to the plain LDO  ');
    await w.find('[data-testid="confirm-restore"]').trigger('click');
    expect(w.emitted('restore')).toEqual([[{ number: 2, message: 'Back to the plain LDO' }]]);
    expect(w.find('[data-testid="restore-dialog"]').exists()).toBe(false);
  });

  it('restores nothing when the dialog is cancelled', async () => {
    const w = mountList();
    await item(w, 3).find('[data-testid="restore"]').trigger('click');
    const cancel = w.findAll('[role="dialog"] button').find((button) => button.text() === 'Cancel');
    await cancel!.trigger('click');
    expect(w.find('[data-testid="restore-dialog"]').exists()).toBe(false);
    expect(w.emitted('restore')).toBeUndefined();
  });

  it('disables the restore buttons while a restore runs', () => {
    const w = mountList({ restoring: 3 });
    const buttons = w.findAll('[data-testid="restore"]');
    expect(buttons.every((button) => (button.element as HTMLButtonElement).disabled)).toBe(true);
  });
});
