// @vitest-environment happy-dom
/**
 * The memory budget page: a pasted size report is recognised as it is typed and sent as text,
 * the chart gets the percentages (with the table as its text alternative), the ledger says what
 * each build saved or spent in words, and the warning level is saved with a PUT.
 */
import '../editor/vuetify-env';
import type { FirmwareBuild } from '@shared/contracts/checks';
import { mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createMemoryHistory, createRouter } from 'vue-router';
import { createVuetify } from 'vuetify';
import MemoryChart from '@/components/memory/MemoryChart.vue';
import ProjectMemoryPage from '@/pages/ProjectMemoryPage.vue';
import { fakeApi, json, settle, type Answer } from '../errata/fake-api';
import { partPage, partSummaries, projectDetail, slug } from '../pin-maps/fixtures';

const stub = { template: '<div />' };
const api = `/api/projects/${slug}`;
const atmega = { slug: 'atmega328p', name: 'ATmega328P' };

/** avr-size -A output of an ATmega328P firmware, as binutils prints it (decimal addresses). */
const sysvReport = [
  'tide-logger.ino.elf  :',
  'section                    size      addr',
  '.data                        54   8388864',
  '.text                      8844         0',
  '.bss                        412   8388918',
  '.comment                     17         0',
  '.note.gnu.avr.deviceinfo     64         0',
  'Total                      9391',
  '',
].join('\n');

function build(id: number, over: Partial<FirmwareBuild>): FirmwareBuild {
  return {
    id,
    label: `v0.${id}`,
    builtOn: `2026-03-0${id}`,
    changeNote: '',
    part: atmega,
    reportFormat: 'sysv',
    reportText: '',
    flashUsed: 0,
    ramUsed: 0,
    flashAvailable: 32256,
    ramAvailable: 2048,
    flashPercent: 0,
    ramPercent: 0,
    bootloaderBytes: 512,
    rule: 'flash used = .text + .data, static RAM = .data + .bss',
    assumptions: ['Static RAM does not include the stack and heap.'],
    flashDelta: null,
    ramDelta: null,
    warnings: { flash: false, ram: false },
    createdAt: `2026-03-0${id}T10:00:00.000Z`,
    ...over,
  };
}

const builds = [
  build(1, { flashUsed: 29000, ramUsed: 1500, flashPercent: (29000 / 32256) * 100, ramPercent: (1500 / 2048) * 100 }),
  build(2, {
    changeNote: 'Moved the menu strings to flash',
    flashUsed: 28688,
    ramUsed: 1548,
    flashPercent: (28688 / 32256) * 100,
    ramPercent: (1548 / 2048) * 100,
    flashDelta: -312,
    ramDelta: 48,
    warnings: { flash: true, ram: false },
  }),
];

let wrapper: VueWrapper | null = null;
beforeEach(() => setActivePinia(createPinia()));
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  vi.unstubAllGlobals();
  document.body.innerHTML = '';
});

function answers(over: Record<string, Answer> = {}, canEdit = true) {
  return {
    [`GET ${api}`]: json(projectDetail(canEdit)),
    [`GET ${api}/builds`]: json({ items: builds, warnAtPercent: 88, viewer: { canEdit } }),
    'GET /api/parts': json({ items: partSummaries }),
    'GET /api/parts/atmega328p': json(partPage('atmega328p')),
    ...over,
  };
}

async function open() {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/', name: 'home', component: stub },
      { path: '/projects/:slug', name: 'project', component: stub },
      { path: '/projects/:slug/memory', name: 'project-memory', component: ProjectMemoryPage },
    ],
  });
  await router.push(`/projects/${slug}/memory`);
  await router.isReady();
  wrapper = mount(
    { template: '<RouterView />' },
    { global: { plugins: [createVuetify(), router] }, attachTo: document.body },
  );
  await settle();
  return wrapper;
}

async function fill(selector: string, value: string) {
  const field = document.querySelector<HTMLInputElement | HTMLTextAreaElement>(selector)!;
  field.value = value;
  field.dispatchEvent(new Event('input'));
  await settle();
}

async function startBuild(w: VueWrapper) {
  await w.get('[data-testid="build-add"]').trigger('click');
  await settle();
  await fill('input[name="label"]', 'v0.3');
  await fill('textarea[name="reportText"]', sysvReport);
}

describe('ProjectMemoryPage', { timeout: 60_000 }, () => {
  it('recognises a pasted avr-size -A report at once and works out the budget for the chosen bootloader', async () => {
    fakeApi(answers());
    const w = await open();
    await startBuild(w);
    expect(w.get('[data-testid="report-detected"]').text()).toContain('SysV format (size -A)');
    expect(w.get('[data-testid="report-detected"]').text()).toContain('.data, .text, .bss');

    // The 512-byte preset leaves 32,768 − 512 = 32,256 B; flash = .text + .data = 8,898 B (27.6 %),
    // RAM = .data + .bss = 466 B of 2,048 B (22.8 %), by the avr-libc rule.
    const preset = w.findAll('.v-chip').find((c) => c.text().startsWith('512-byte bootloader'))!;
    await preset.trigger('click');
    await settle();
    const preview = w.get('[data-testid="report-preview"]').text();
    expect(preview).toContain('Flash 8,898 B of 32,256 B (27.6 %)');
    expect(preview).toContain('RAM 466 B of 2,048 B (22.8 %)');
  });

  it('says what is wrong with a report that does not add up, before anything is sent', async () => {
    const calls = fakeApi(answers());
    const w = await open();
    await startBuild(w);
    await fill('textarea[name="reportText"]', sysvReport.replace('Total                      9391', 'Total 9000'));
    expect(w.get('[data-testid="report-error"]').text()).toContain('add up to 9391, but Total says 9000');
    await w.get('form').trigger('submit');
    await settle();
    expect(calls.writes()).toEqual([]);
  });

  it('sends the report as text with the last build’s part, and shows the server’s complaint inline', async () => {
    const calls = fakeApi(
      answers({
        [`POST ${api}/builds`]: json(
          { error: { code: 'size_report_invalid', message: 'The report lists no .text section.' } },
          400,
        ),
      }),
    );
    const w = await open();
    await startBuild(w);
    await fill('input[name="changeNote"]', 'Logger keeps a ring buffer');
    await w.get('form').trigger('submit');
    await settle();
    expect(calls.writes()).toHaveLength(1);
    expect(calls.writes()[0]!.url).toBe(`${api}/builds`);
    expect(calls.writes()[0]!.body).toMatchObject({
      label: 'v0.3',
      partSlug: 'atmega328p',
      reportText: sysvReport,
      changeNote: 'Logger keeps a ring buffer',
      bootloaderBytes: 0,
    });
    expect(w.get('[data-testid="build-server-error"]').text()).toBe('The report lists no .text section.');
  });

  it('gives the chart the percentages per build and the threshold, with the same numbers in the table', async () => {
    fakeApi(answers());
    const w = await open();
    const chart = w.getComponent(MemoryChart);
    expect(chart.props('labels')).toEqual(['v0.1', 'v0.2']);
    expect(chart.props('flashPercent')).toEqual([(29000 / 32256) * 100, (28688 / 32256) * 100]);
    expect(chart.props('ramPercent')).toEqual([(1500 / 2048) * 100, (1548 / 2048) * 100]);
    expect(chart.props('warnAtPercent')).toBe(88);
    const rows = w.findAll('[data-testid="memory-row"]').map((r) => r.text());
    // 29,000 / 32,256 = 89.9 %; 28,688 / 32,256 = 88.9 %; 1,548 / 2,048 = 75.6 %.
    expect(rows[0]).toContain('89.9 %');
    expect(rows[1]).toContain('88.9 %');
    expect(rows[1]).toContain('75.6 %');
    expect(rows[1]).toContain('at or above the warning level');
  });

  it('writes what each build saved or spent in words, and warns about the latest build', async () => {
    fakeApi(answers());
    const w = await open();
    const deltas = w.findAll('[data-testid="ledger-delta"]').map((d) => [d.attributes('data-kind'), d.text()]);
    expect(deltas).toContainEqual(['saved', '−312 B flash saved']);
    expect(deltas).toContainEqual(['spent', '+48 B RAM spent']);
    expect(deltas).toContainEqual(['first', 'first build: nothing to compare with']);
    expect(w.get('[data-testid="memory-ledger"]').text()).toContain('Moved the menu strings to flash');
    expect(w.get('[data-testid="memory-warning"]').text()).toContain('v0.2');
    expect(w.get('[data-testid="memory-warning"]').text()).toContain('flash at 88.9 %');
  });

  it('saves a new warning level with a PUT', async () => {
    const calls = fakeApi(
      answers({
        [`PUT ${api}/builds/settings`]: json({ items: builds, warnAtPercent: 80, viewer: { canEdit: true } }),
      }),
    );
    const w = await open();
    await fill('input[name="warnAtPercent"]', '80');
    await w.get('[data-testid="warn-save"]').element.closest('form')!.dispatchEvent(new Event('submit'));
    await settle();
    expect(calls.writes()).toEqual([{ method: 'PUT', url: `${api}/builds/settings`, body: { warnAtPercent: 80 } }]);
  });
});
