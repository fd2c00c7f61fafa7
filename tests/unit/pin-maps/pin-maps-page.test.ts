// @vitest-environment happy-dom
/**
 * The pin maps page: pins resolve through the part's profile as they are typed, the check runs in
 * the browser and cites the datasheet, a finding becomes a prefilled erratum, and a save carries
 * the rows and the revision they started from — keeping them when someone else saved meanwhile.
 */
import '../editor/vuetify-env';
import type { PinMapRow } from '@shared/contracts/parts';
import { mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { nextTick } from 'vue';
import { createMemoryHistory, createRouter } from 'vue-router';
import { createVuetify } from 'vuetify';
import ErratumEditPage from '@/pages/ErratumEditPage.vue';
import ProjectPinMapsPage from '@/pages/ProjectPinMapsPage.vue';
import { fakeApi, json, settle, type Answer } from '../errata/fake-api';
import { partPage, partSummaries, pinMap, projectDetail, revA, slug } from './fixtures';

const stub = { template: '<div />' };
const api = `/api/projects/${slug}`;
const categories = {
  items: [
    { slug: 'pin-capability', name: 'Pin capability', description: '' },
    { slug: 'logic-level', name: 'Logic level', description: '' },
  ],
};
const relayOnA6: PinMapRow = { pin: 'A6', signal: 'RELAY_EN', function: 'digital_out' };

let wrapper: VueWrapper | null = null;
beforeEach(() => {
  setActivePinia(createPinia());
  localStorage.clear();
});
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  vi.unstubAllGlobals();
  vi.restoreAllMocks();
  document.body.innerHTML = '';
});

function answers(over: Record<string, Answer> = {}, canEdit = true, rows: PinMapRow[] = []) {
  return {
    [`GET ${api}`]: json(projectDetail(canEdit)),
    [`GET ${api}/pin-maps`]: json({ items: [pinMap({ rows })], viewer: { canEdit } }),
    'GET /api/parts': json({ items: partSummaries }),
    'GET /api/parts/atmega328p': json(partPage('atmega328p')),
    [`GET ${api}/errata`]: json({
      items: [],
      boards: [revA],
      categories: categories.items,
      viewer: { canEdit, canOwn: canEdit, canRestore: canEdit, canPropose: false },
    }),
    'GET /api/categories': json(categories),
    ...over,
  };
}

async function open() {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/', name: 'home', component: stub },
      { path: '/tools/level-check', name: 'level-check', component: stub },
      { path: '/projects/:slug', name: 'project', component: stub },
      { path: '/projects/:slug/settings', name: 'project-settings', component: stub },
      { path: '/projects/:slug/pin-maps', name: 'project-pin-maps', component: ProjectPinMapsPage },
      { path: '/projects/:slug/errata', name: 'project-errata', component: stub },
      { path: '/projects/:slug/errata/new', name: 'erratum-new', component: ErratumEditPage },
      { path: '/projects/:slug/errata/:code', name: 'erratum', component: stub },
      { path: '/projects/:slug/errata/:code/history', name: 'erratum-history', component: stub },
      { path: '/projects/:slug/propose/erratum', name: 'proposal-new-erratum', component: stub },
    ],
  });
  await router.push(`/projects/${slug}/pin-maps`);
  await router.isReady();
  wrapper = mount(
    { template: '<RouterView />' },
    { global: { plugins: [createVuetify(), router] }, attachTo: document.body },
  );
  await settle();
  return { wrapper, router };
}

async function type(input: HTMLInputElement, value: string) {
  input.value = value;
  input.dispatchEvent(new Event('input'));
  await nextTick();
}
const inputs = (name: string) => [...document.querySelectorAll<HTMLInputElement>(`input[name="${name}"]`)];

async function click(w: VueWrapper, testId: string) {
  await w.get(`[data-testid="${testId}"]`).trigger('click');
  await settle();
}

// The erratum form brings the rich editor along; on a loaded machine its first import takes long.
describe('ProjectPinMapsPage', { timeout: 60_000 }, () => {
  it('shows how a typed pin resolves and finds that A6 cannot drive a relay, citing the datasheet', async () => {
    fakeApi(answers());
    const { wrapper } = await open();
    await click(wrapper, 'add-row');
    await type(inputs('pin')[0]!, 'A6');
    await type(inputs('signal')[0]!, 'RELAY_EN');
    // A6 is the board label of ADC6, package pin 19 (TQFP-32).
    expect(document.body.textContent).toContain('A6 → ADC6, pin 19');

    await click(wrapper, 'check-pins');
    const findings = wrapper.findAll('[data-testid="pin-finding"]');
    expect(findings).toHaveLength(1);
    expect(findings[0]!.attributes('data-code')).toBe('analog_only');
    expect(findings[0]!.text()).toContain('Error');
    expect(findings[0]!.text()).toContain('A6 (ADC6)');
    expect(findings[0]!.get('[data-testid="finding-source"]').text()).toContain(
      'Microchip ATmega328/P Datasheet Complete DS40001984A (2018), Pin descriptions, ADC7:6 (TQFP and QFN/MLF packages only) (datasheet)',
    );
    // Next to A6 on the board, A5, A4 and A3 (PC5–PC3) are full digital I/O pins; A7 is analog-only too.
    expect(findings[0]!.get('[data-testid="finding-nearest"]').text()).toContain('A5 (PC5), A4 (PC4), A3 (PC3)');
    expect(wrapper.find('[data-testid="check-caution"]').exists()).toBe(true);
    // The row the finding points at is marked with a word, not colour alone.
    const row = wrapper.get('[data-testid="pin-map-row"]');
    expect(row.attributes('data-flagged')).toBe('error');
    expect(row.text()).toContain('Error');
  });

  it('turns a finding into a new erratum with the draft filled in', { timeout: 120_000 }, async () => {
    fakeApi(answers({}, true, [relayOnA6]));
    const { wrapper, router } = await open();
    await click(wrapper, 'check-pins');
    await click(wrapper, 'create-erratum');

    expect(router.currentRoute.value.name).toBe('erratum-new');
    expect(router.currentRoute.value.params).toEqual({ slug });
    const form = wrapper.findComponent({ name: 'ErratumForm' });
    expect(form.exists()).toBe(true);
    expect(form.props('modelValue')).toMatchObject({
      title: 'RELAY_EN on A6 (ADC6): analog-input-only pin',
      category: 'pin-capability',
      severity: 'major',
      status: 'open',
      parts: ['ATmega328P'],
      pins: ['A6 (ADC6)'],
      affected: [revA.id],
    });
    expect(document.querySelector<HTMLInputElement>('input[name="title"]')!.value).toBe(
      'RELAY_EN on A6 (ADC6): analog-input-only pin',
    );
  });

  it('saves the rows with the revision they started from', async () => {
    const calls = fakeApi(
      answers(
        {
          [`PUT ${api}/pin-maps/41`]: (call) => ({
            status: 200,
            body: pinMap({ rows: (call.body as { rows: PinMapRow[] }).rows, revision: 4 }),
          }),
        },
        true,
        [relayOnA6],
      ),
    );
    const { wrapper } = await open();
    await type(inputs('pin')[0]!, 'D7');
    await click(wrapper, 'save-pin-map');
    expect(calls.writes()).toHaveLength(1);
    expect(calls.writes()[0]!.body).toEqual({
      supplyVolts: null,
      rows: [{ pin: 'D7', signal: 'RELAY_EN', function: 'digital_out' }],
      baseRevision: 3,
    });
    expect(wrapper.find('[data-testid="unsaved"]').exists()).toBe(false);
  });

  it('keeps the rows and says so when someone else saved meanwhile, then saves on top of theirs', async () => {
    let listCalls = 0;
    const theirs = pinMap({ rows: [{ pin: 'D8', signal: 'BUZZER', function: 'pwm' }], revision: 5 });
    const calls = fakeApi(
      answers(
        {
          [`GET ${api}/pin-maps`]: () => {
            listCalls += 1;
            return {
              status: 200,
              body: { items: [listCalls === 1 ? pinMap({ rows: [relayOnA6] }) : theirs], viewer: { canEdit: true } },
            };
          },
          [`PUT ${api}/pin-maps/41`]: (call) =>
            (call.body as { baseRevision: number }).baseRevision === 5
              ? { status: 200, body: pinMap({ rows: (call.body as { rows: PinMapRow[] }).rows, revision: 6 }) }
              : { status: 409, body: { error: { code: 'edit_conflict', message: 'The pin map changed meanwhile.' } } },
        },
        true,
        [relayOnA6],
      ),
    );
    const { wrapper } = await open();
    await type(inputs('pin')[0]!, 'D7');
    await click(wrapper, 'save-pin-map');

    const alert = wrapper.get('[data-testid="pin-map-conflict"]');
    expect(alert.text()).toContain('Someone else saved this pin map meanwhile');
    expect(alert.text()).toContain('revision 5');
    expect(alert.text()).toContain('Your rows are still here and not saved');
    expect(inputs('pin')[0]!.value).toBe('D7');
    expect(wrapper.find('[data-testid="unsaved"]').exists()).toBe(true);

    await click(wrapper, 'save-mine');
    const puts = calls.writes();
    expect(puts).toHaveLength(2);
    expect(puts[1]!.body).toEqual({
      supplyVolts: null,
      rows: [{ pin: 'D7', signal: 'RELAY_EN', function: 'digital_out' }],
      baseRevision: 5,
    });
    expect(wrapper.find('[data-testid="pin-map-conflict"]').exists()).toBe(false);
  });

  it('links each way of a connection to the level check with the part and its supply', async () => {
    fakeApi(answers());
    const { wrapper } = await open();
    // The map states no supply, so the ATmega328P's nominal 5 V applies (db/parts/atmega328p.json).
    const asDriver = wrapper.get('[data-testid="levels-as-driver"]');
    const asReceiver = wrapper.get('[data-testid="levels-as-receiver"]');
    expect(asDriver.attributes('href')).toBe('/tools/level-check?driver=atmega328p&driverV=5');
    expect(asReceiver.attributes('href')).toBe('/tools/level-check?receiver=atmega328p&receiverV=5');
  });

  it('shows readers the rows without inputs, and they can still run the check', async () => {
    fakeApi(answers({}, false, [relayOnA6]));
    const { wrapper } = await open();
    expect(inputs('pin')).toHaveLength(0);
    expect(wrapper.find('[data-testid="add-row"]').exists()).toBe(false);
    expect(wrapper.get('[data-testid="pin-map-row"]').text()).toContain('RELAY_EN');
    await click(wrapper, 'check-pins');
    expect(wrapper.findAll('[data-testid="pin-finding"]')).toHaveLength(1);
    expect(wrapper.find('[data-testid="create-erratum"]').exists()).toBe(false);
  });

  it('imports rows from pasted CSV after a preview that names the bad lines', async () => {
    fakeApi(answers());
    const { wrapper } = await open();
    await click(wrapper, 'csv-import');
    const textarea = document.querySelector<HTMLTextAreaElement>('textarea[name="csv"]')!;
    textarea.value = 'pin;signal;function\nD9;LAMP;PWM\nD4;MOTOR;servo\n';
    textarea.dispatchEvent(new Event('input'));
    await settle();
    expect(document.body.textContent).toContain('Line 3: Unknown function "servo".');
    document.querySelector<HTMLButtonElement>('[data-testid="csv-replace"]')!.click();
    await settle();
    expect(inputs('pin').map((i) => i.value)).toEqual(['D9']);
    expect(inputs('signal').map((i) => i.value)).toEqual(['LAMP']);
  });
});
