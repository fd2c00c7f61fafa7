// @vitest-environment happy-dom
/**
 * The level check page against the shipped profiles (db/parts), each expectation worked by hand
 * from the datasheet values the profiles cite:
 * - 74HC: TI SN74HC240 (SCLS128H) §4.2, VCC = 4.5 V row: VOH 4.4 V (at 20 µA), VOL 0.1 V,
 *   VIH 3.15 V, VIL 1.35 V; input limit VCC + 0.5 V (from memory).
 * - 74HCT: TI SN74HCT04 (SCLS042F) §5.2, VCC 4.5–5.5 V: VIH 2.0 V, VIL 0.8 V; no output rows.
 * - 3.3 V LVCMOS: JEDEC JESD8C (corroborated): VOH VDD − 0.2 V, VOL 0.2 V (at 100 µA).
 * - ATmega328P: Microchip DS40001984A Table 32-2: VIH 0.6·VCC, VIL 0.3·VCC for VCC 2.4–5.5 V.
 * Plus the RC debounce helper's arithmetic (τ = R·C, f_c = 1/(2πRC), t = −RC·ln(1 − Vth/V)).
 */
import '../editor/vuetify-env';
import type { PartProfile } from '@shared/contracts/parts';
import { flushPromises, mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createMemoryHistory, createRouter, type Router } from 'vue-router';
import { createVuetify } from 'vuetify';
import LevelCheckEnd from '@/components/checks/LevelCheckEnd.vue';
import LevelCheckPage from '@/pages/LevelCheckPage.vue';
import { fakeApi, json, settle, type Answer } from '../errata/fake-api';
import { partList, partPage, profile, summary } from './fixtures';

const stub = { template: '<div />' };

/** An invented CMOS input with VIH 0.7·VCC and VIL 0.3·VCC, for the textbook RC example. */
const textbookCmos: PartProfile = {
  ...profile('atmega328p'),
  slug: 'textbook-cmos',
  name: 'Textbook CMOS input',
  pins: [],
  levels: {
    inputs: [
      {
        supply: { minVolts: 2, maxVolts: 6 },
        vih: { kind: 'fraction_of_supply', fraction: 0.7, source: profile('atmega328p').levels.inputs[0]!.vih.source },
        vil: { kind: 'fraction_of_supply', fraction: 0.3, source: profile('atmega328p').levels.inputs[0]!.vil.source },
      },
    ],
    outputs: [],
  },
};

let wrapper: VueWrapper | null = null;
let router: Router;
beforeEach(() => setActivePinia(createPinia()));
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  vi.unstubAllGlobals();
  document.body.innerHTML = '';
});

function answers(): Record<string, Answer> {
  const all: Record<string, Answer> = {
    'GET /api/parts': json({ items: [...partList.items, summary(textbookCmos)] }),
    'GET /api/parts/textbook-cmos': json(partPage('atmega328p', { profile: textbookCmos })),
  };
  for (const p of partList.items) all[`GET /api/parts/${p.slug}`] = json(partPage(p.slug));
  return all;
}

async function open(query: Record<string, string>) {
  const api = fakeApi(answers());
  router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/tools/level-check', name: 'level-check', component: LevelCheckPage },
      { path: '/parts/:partSlug', name: 'part', component: stub },
    ],
  });
  await router.push({ name: 'level-check', query });
  await router.isReady();
  wrapper = mount(
    { template: '<RouterView />' },
    { global: { plugins: [createVuetify(), router] }, attachTo: document.body },
  );
  await settle();
  return { w: wrapper, api };
}

const get = (w: VueWrapper, testid: string) => w.get(`[data-testid="${testid}"]`);
const numberRow = (w: VueWrapper, key: string) => w.get(`tr[data-number="${key}"]`);

describe('the level check page', { timeout: 30_000 }, () => {
  it('74HC at 4.5 V into 74HCT at 5 V is ok, with the numbers from the datasheets', async () => {
    const { w } = await open({ driver: '74hc', driverV: '4.5', receiver: '74hct', receiverV: '5' });
    expect(get(w, 'verdict').text()).toBe('OK');
    // High: VOH 4.4 V (SN74HC240 §4.2, 4.5 V) − VIH 2.0 V (SN74HCT04 §5.2) = 2.4 V
    expect(get(w, 'margin-high').text()).toContain('+2.4 V');
    // Low: VIL 0.8 V (SN74HCT04) − VOL 0.1 V (SN74HC240) = 0.7 V
    expect(get(w, 'margin-low').text()).toContain('+0.7 V');
    // Overvoltage: the 4.5 V high against 74HCT VCC + 0.5 V = 5 + 0.5 = 5.5 V: within.
    expect(get(w, 'overvoltage').text()).toContain('No overvoltage');
    expect(get(w, 'overvoltage').text()).toContain('5.5 V');
    expect(numberRow(w, 'voh').get('[data-testid="value"]').text()).toContain('4.4 V');
    expect(numberRow(w, 'vih').get('[data-testid="value"]').text()).toContain('2 V');
    expect(numberRow(w, 'voh').text()).toContain('0.02 mA');
    expect(numberRow(w, 'vih').text()).toContain('SN74HCT04');
    expect(w.find('[data-testid="extrapolated"]').exists()).toBe(false);
    expect(w.get('[role="note"]').text()).toContain('measuring the real circuit');
  });

  it('74HC at 5 V into 74HCT at 5 V: the same wide margins, but the 4.5 V row is extrapolated', async () => {
    const { w } = await open({ driver: '74hc', driverV: '5', receiver: '74hct', receiverV: '5' });
    // The 74HC rows on file are for VCC = 4.5 V only (SCLS128H §4.2), so the values at 5 V are
    // the 4.5 V ones: 4.4 − 2.0 = 2.4 V and 0.8 − 0.1 = 0.7 V; the check calls that marginal.
    expect(get(w, 'margin-high').text()).toContain('+2.4 V');
    expect(get(w, 'margin-low').text()).toContain('+0.7 V');
    expect(get(w, 'verdict').text()).toBe('Marginal');
    expect(numberRow(w, 'voh').find('[data-testid="extrapolated"]').exists()).toBe(true);
    expect(numberRow(w, 'vih').find('[data-testid="extrapolated"]').exists()).toBe(false);
  });

  it('3.3 V LVCMOS into 74HC at 5 V fails: its high is below the 74HC VIH', async () => {
    const { w } = await open({ driver: 'lvcmos-3v3', driverV: '3.3', receiver: '74hc', receiverV: '5' });
    // VOH = VDD − 0.2 V = 3.3 − 0.2 = 3.1 V (JESD8C); VIH = 3.15 V (SN74HC240, 4.5 V row, extrapolated to 5 V)
    // High margin: 3.1 − 3.15 = −0.05 V. Low margin: VIL 1.35 − VOL 0.2 = 1.15 V.
    expect(get(w, 'verdict').text()).toBe('Fails');
    expect(get(w, 'margin-high').text()).toContain('−0.05 V');
    expect(get(w, 'margin-low').text()).toContain('+1.15 V');
    expect(numberRow(w, 'voh').get('[data-testid="stated"]').text()).toBe('VDD − 0.2 V');
    expect(numberRow(w, 'voh').get('[data-testid="value"]').text()).toContain('3.1 V');
    expect(get(w, 'messages').text()).toContain('below the 74HC');
  });

  it('keeps the inputs in the URL query, both ways', async () => {
    const { w } = await open({ driver: '74hc', driverV: '4.5', receiver: '74hct', receiverV: '5' });
    // Typing a supply writes it to the query.
    await get(w, 'driver-supply').get('input').setValue('5');
    await settle();
    expect(router.currentRoute.value.query).toMatchObject({ driver: '74hc', driverV: '5', receiver: '74hct' });
    expect(get(w, 'verdict').text()).toBe('Marginal');

    // A shared address (a new query) sets the fields and the result.
    await router.replace({ name: 'level-check', query: { driver: 'lvcmos-3v3', receiver: '74hc', receiverV: '5' } });
    await settle();
    expect(get(w, 'driver-supply').get('input').element.value).toBe('');
    // No driverV: the LVCMOS nominal 3.3 V applies, so the result is the failing one above.
    expect(get(w, 'margin-high').text()).toContain('−0.05 V');

    // Choosing another driver part drops its old supply from the query.
    await w.findAllComponents(LevelCheckEnd)[0]!.vm.$emit('update:slug', 'rp2040');
    await settle();
    expect(router.currentRoute.value.query).toEqual({ driver: 'rp2040', receiver: '74hc', receiverV: '5' });
  });

  it('flags a supply outside the part’s range', async () => {
    const { w } = await open({ driver: '74hc', driverV: '4.5', receiver: '74hct', receiverV: '3.3' });
    // 74HCT: VCC 4.5–5.5 V (SN74HCT04 §5.2)
    expect(get(w, 'receiver-supply').text()).toContain('Outside the 4.5–5.5 V');
    expect(get(w, 'verdict').text()).toBe('Fails');
  });

  it('shows a part without output levels as a clear message', async () => {
    const { w } = await open({ driver: '74hct', receiver: '74hc' });
    expect(get(w, 'level-problem').text()).toBe('No output levels (VOH/VOL) are on file for the 74HCT.');
    expect(w.find('[data-testid="verdict"]').exists()).toBe(false);
  });
});

describe('the RC debounce helper', { timeout: 30_000 }, () => {
  it('10 kΩ and 100 nF into a 0.7·VCC input: τ 1 ms, cutoff 159.2 Hz, rise 1.204 ms', async () => {
    const { w } = await open({ receiver: 'textbook-cmos', receiverV: '5' });
    // τ = R·C = 10 000 Ω × 100 × 10⁻⁹ F = 1 × 10⁻³ s
    expect(get(w, 'rc-tau').text()).toContain('1 ms');
    // f_c = 1/(2π·RC) = 1/(2π × 0.001) = 159.15 Hz (common practice)
    expect(get(w, 'rc-cutoff').text()).toContain('159.2 Hz');
    // rise to 0.7·VCC: t = −RC·ln(1 − 0.7) = −0.001 × ln 0.3 = 0.001 × 1.20397 = 1.204 ms
    expect(get(w, 'rc-rise').text()).toContain('1.204 ms');
    // fall to 0.3·VCC: t = −RC·ln(0.3) = 1.204 ms as well
    expect(get(w, 'rc-fall').text()).toContain('1.204 ms');
    expect(get(w, 'rc-working').findAll('li')).toHaveLength(4);
    expect(w.text()).toContain('SCEA094');
  });

  it('follows the level check’s receiver: the ATmega328P at 5 V, and recomputes as C changes', async () => {
    const { w } = await open({ driver: '74hc', driverV: '4.5', receiver: 'atmega328p', receiverV: '5' });
    // ATmega328P VIH 0.6·VCC (Table 32-2): rise t = −1 ms × ln(1 − 0.6) = 1 ms × 0.91629 = 916.3 µs
    expect(get(w, 'rc-rise').text()).toContain('916.3 µs');
    // VIL 0.3·VCC: fall t = −1 ms × ln(0.3) = 1.204 ms
    expect(get(w, 'rc-fall').text()).toContain('1.204 ms');
    await get(w, 'rc-c').get('input').setValue('1');
    await flushPromises();
    // 10 kΩ × 1 nF = 10 µs
    expect(get(w, 'rc-tau').text()).toContain('10 µs');
    await get(w, 'rc-r').get('input').setValue('0');
    await flushPromises();
    expect(get(w, 'rc-problem').text()).toContain('resistance greater than zero');
  });
});
