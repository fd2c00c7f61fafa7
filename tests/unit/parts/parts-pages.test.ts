// @vitest-environment happy-dom
/**
 * The parts library as a reader uses it: the list filters by name or alias and links to part
 * pages; a part page (the real ATmega328P profile) shows the pin table with capabilities in words
 * and each row's source, the mentions with their links, and an empty state.
 */
import '../editor/vuetify-env';
import { flushPromises, mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createMemoryHistory, createRouter } from 'vue-router';
import { createVuetify } from 'vuetify';
import PartPage from '@/pages/PartPage.vue';
import PartsPage from '@/pages/PartsPage.vue';
import { fakeApi, json, settle } from '../errata/fake-api';
import { mentions, partList, partPage } from './fixtures';

const stub = { template: '<div data-testid="elsewhere" />' };

let wrapper: VueWrapper | null = null;
beforeEach(() => setActivePinia(createPinia()));
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  vi.unstubAllGlobals();
  document.body.innerHTML = '';
});

async function open(path: string, answers: Parameters<typeof fakeApi>[0]) {
  const api = fakeApi(answers);
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/parts', name: 'parts', component: PartsPage },
      { path: '/parts/:partSlug', name: 'part', component: PartPage },
      { path: '/tools/level-check', name: 'level-check', component: stub },
      { path: '/projects/:slug', name: 'project', component: stub },
      { path: '/projects/:slug/errata/:code', name: 'erratum', component: stub },
      { path: '/projects/:slug/log/:documentId', name: 'log-entry', component: stub },
    ],
  });
  await router.push(path);
  await router.isReady();
  wrapper = mount(
    { template: '<RouterView />' },
    { global: { plugins: [createVuetify(), router] }, attachTo: document.body },
  );
  await settle();
  return { w: wrapper, router, api };
}

async function type(w: VueWrapper, testid: string, text: string) {
  await w.get(`[data-testid="${testid}"] input`).setValue(text);
  await flushPromises();
}

describe('the parts list', { timeout: 30_000 }, () => {
  it('lists every part with kind, pin count and mentions, and filters by name or alias', async () => {
    const { w } = await open('/parts', { 'GET /api/parts': json(partList) });
    const rows = () => w.findAll('tbody tr[data-part]').map((r) => r.attributes('data-part'));
    expect(rows()).toHaveLength(partList.items.length);
    const atmega = w.get('tr[data-part="atmega328p"]');
    expect(atmega.text()).toContain('Microcontroller');
    const cells = atmega.findAll('td');
    expect(cells[2]!.text()).toBe(String(partList.items.find((p) => p.slug === 'atmega328p')!.pinCount));
    expect(cells[3]!.text()).toContain('2');

    await type(w, 'parts-filter', 'hct');
    expect(rows()).toEqual(['74hct']);

    // By an alias only: the 74HC profile answers to "HC CMOS" (db/parts/logic-families.json), its name does not.
    await type(w, 'parts-filter', 'hc cmos');
    expect(rows()).toEqual(['74hc']);

    await type(w, 'parts-filter', 'no-such-chip');
    expect(rows()).toEqual([]);
    expect(w.text()).toContain('No part matches');
  });

  it('links each part to its page', async () => {
    const { w } = await open('/parts', { 'GET /api/parts': json(partList) });
    expect(w.get('tr[data-part="rp2040"] a').attributes('href')).toBe('/parts/rp2040');
  });
});

describe('the part page', { timeout: 30_000 }, () => {
  const atmega = () => ({ 'GET /api/parts/atmega328p': json(partPage('atmega328p', { mentions })) });

  it('shows A6 as an analog input without digital output, from the real ATmega328P profile', async () => {
    const { w } = await open('/parts/atmega328p', atmega());
    expect(w.get('h1').text()).toBe('ATmega328P');
    const a6 = w.get('tr[data-pin="ADC6"]');
    expect(a6.get('th').text()).toBe('A6');
    const caps = a6.get('[data-testid="capabilities"]');
    expect(caps.text()).toContain('Analog in');
    expect(caps.text()).not.toContain('Digital out');
    // D2 (PD2) reads its interrupt in words with the datasheet's name.
    const d2 = w.get('tr[data-pin="PD2"]');
    expect(d2.text()).toContain('Ext. interrupt (INT0)');
    expect(d2.text()).toContain('Digital out');
  });

  it('gives every pin row its source, readable without hover', async () => {
    const { w } = await open('/parts/atmega328p', atmega());
    const rows = w.findAll('tbody tr[data-pin]');
    expect(rows.length).toBe(partPage('atmega328p').profile.pins.length);
    for (const row of rows) {
      const toggle = row.get('[data-testid="row-source"] button');
      expect(toggle.attributes('aria-label')).toMatch(/Source of the .+ row: .+\(/);
    }
    // A6's row points at the ADC7:6 pin description; opening it shows the note in the page.
    const a6Source = w.get('tr[data-pin="ADC6"] [data-testid="row-source"]');
    expect(a6Source.text()).toContain('ADC7:6');
    await a6Source.get('button').trigger('click');
    const full = a6Source.get('[data-testid="source-full"]');
    expect(full.isVisible()).toBe(true);
    expect(full.text()).toContain('Microchip ATmega328/P Datasheet Complete');
    expect(a6Source.get('button').attributes('aria-expanded')).toBe('true');
  });

  it('filters the pin table by label or capability', async () => {
    const { w } = await open('/parts/atmega328p', atmega());
    await type(w, 'pin-filter', 'A6');
    expect(w.findAll('tbody tr[data-pin]').map((r) => r.attributes('data-pin'))).toEqual(['ADC6']);
    await type(w, 'pin-filter', 'I²C SDA');
    const sda = w.findAll('tbody tr[data-pin]');
    expect(sda.length).toBeGreaterThan(0);
    for (const row of sda) expect(row.text()).toContain('I²C SDA');
  });

  it('links mentions to their erratum or lesson route and names the pins', async () => {
    const { w, router } = await open('/parts/atmega328p', atmega());
    const items = w.findAll('.part-mentions__item');
    expect(items).toHaveLength(2);
    const erratum = items[0]!;
    expect(erratum.text()).toContain('Erratum');
    expect(erratum.text()).toContain('Tide clock');
    expect(erratum.text()).toContain('pins A6');
    expect(erratum.text()).toContain('Major');
    const link = erratum.get('a.part-mentions__title');
    expect(link.attributes('href')).toBe('/projects/tide-clock/errata/E3');
    await link.trigger('click');
    await settle();
    expect(router.currentRoute.value.name).toBe('erratum');
    expect(router.currentRoute.value.params).toMatchObject({ slug: 'tide-clock', code: 'E3' });
  });

  it('says so when nothing mentions the part, and shows the caution near the pins', async () => {
    const { w } = await open('/parts/atmega328p', { 'GET /api/parts/atmega328p': json(partPage('atmega328p')) });
    expect(w.get('[data-testid="mentions-empty"]').text()).toContain('No erratum or lesson mentions the ATmega328P');
    const pinsSection = w.get('section[aria-labelledby="part-pins"]');
    expect(pinsSection.find('[role="note"]').exists()).toBe(true);
    expect(w.find('#part-revisions').exists()).toBe(false);
  });

  it('shows the revisions to moderators', async () => {
    const { w } = await open('/parts/atmega328p', {
      'GET /api/parts/atmega328p': json(partPage('atmega328p', { viewer: { canEdit: true }, revision: 2 })),
      'GET /api/parts/atmega328p/revisions': json({
        items: [
          {
            number: 2,
            note: 'VOL at 3 V corrected from Table 32-2',
            author: { handle: 'ines', displayName: 'Ines K.' },
            createdAt: '2026-11-02T10:00:00.000Z',
          },
          { number: 1, note: 'Seeded', author: null, createdAt: '2026-10-01T10:00:00.000Z' },
        ],
      }),
    });
    const list = w.get('[data-testid="revisions"]');
    expect(list.findAll('li')).toHaveLength(2);
    expect(list.text()).toContain('VOL at 3 V corrected');
  });

  it('shows a missing part as such', async () => {
    const { w } = await open('/parts/nope', {});
    expect(w.get('h1').text()).toBe('No such part');
  });
});
