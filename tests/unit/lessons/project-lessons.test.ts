// @vitest-environment happy-dom
/**
 * A project's lessons as readers and editors meet them: rendered statements with tags (pending
 * ones marked) and links to the errata they come from; editors add and edit in a dialog, and what
 * reaches the server is the lesson as typed, based on the revision they edited.
 */
import '../editor/vuetify-env';
import type { Lesson, LessonList } from '@shared/contracts/errata';
import { flushPromises, mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { nextTick } from 'vue';
import { createMemoryHistory, createRouter } from 'vue-router';
import { createVuetify } from 'vuetify';
import ProjectLessons from '@/components/lessons/ProjectLessons.vue';
import { fakeApi, json } from '../errata/fake-api';

const lesson: Lesson = {
  id: 31,
  body: 'Check the pin table before routing a relay driver.',
  html: '<p>Check the pin table before routing a relay driver.</p>',
  tags: [
    { slug: 'input-only-pin', name: 'input-only pin', state: 'approved' },
    { slug: 'bodge-wire', name: 'bodge wire', state: 'pending' },
  ],
  errata: [{ number: 1, code: 'E1', title: 'Relay never switches' }],
  revision: 4,
  createdAt: '2026-02-01T09:00:00.000Z',
  updatedAt: '2026-02-03T09:00:00.000Z',
};

const listAs = (canEdit: boolean, items: Lesson[] = [lesson]): LessonList => ({
  items,
  viewer: { canEdit, canOwn: canEdit, canRestore: canEdit },
});
const errataList = {
  items: [
    { number: 1, code: 'E1', title: 'Relay never switches' },
    { number: 2, code: 'E2', title: 'Regulator overheats' },
  ],
  boards: [],
  categories: [],
  viewer: { canEdit: true, canOwn: true, canRestore: true, canPropose: false },
};

let wrapper: VueWrapper | null = null;
beforeEach(() => setActivePinia(createPinia()));
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  vi.unstubAllGlobals();
  document.body.innerHTML = '';
});

async function mountLessons() {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/', component: { template: '<div />' } },
      { path: '/projects/:slug/errata/:code', name: 'erratum', component: { template: '<div />' } },
      { path: '/tags/:tagSlug', name: 'tag', component: { template: '<div />' } },
    ],
  });
  await router.push('/');
  wrapper = mount(ProjectLessons, {
    props: { slug: 'greenhouse-node' },
    global: { plugins: [createVuetify(), router] },
    attachTo: document.body,
  });
  await flushPromises();
  return wrapper;
}

const buttons = (text: string) =>
  [...document.querySelectorAll('button')].filter((b) => (b.textContent ?? '').trim() === text);

async function settle() {
  await flushPromises();
  await nextTick();
  await new Promise((resolve) => setTimeout(resolve, 0));
  await flushPromises();
}

describe('ProjectLessons', () => {
  it('shows each lesson with its tags, marking the pending one, and links to its errata', async () => {
    fakeApi({ 'GET /api/projects/greenhouse-node/lessons': json(listAs(false)) });
    const w = await mountLessons();
    const item = w.get('[data-lesson="31"]');
    expect(item.text()).toContain('Check the pin table before routing a relay driver.');
    const tags = item.findAll('[data-tag-state]');
    expect(tags.map((t) => [t.text().includes('pending review'), t.attributes('data-tag-state')])).toEqual([
      [false, 'approved'],
      [true, 'pending'],
    ]);
    expect(tags[0]!.attributes('href')).toBe('/tags/input-only-pin');
    expect(item.get('a[href*="/errata/"]').attributes('href')).toBe('/projects/greenhouse-node/errata/E1');
    expect(buttons('Add a lesson')).toHaveLength(0);
    expect(buttons('Edit')).toHaveLength(0);
  });

  it('lets an editor add a lesson and sends it as typed', async () => {
    const api = fakeApi({
      'GET /api/projects/greenhouse-node/lessons': json(listAs(true)),
      'GET /api/projects/greenhouse-node/errata': json(errataList),
      'POST /api/projects/greenhouse-node/lessons': () => ({ status: 201, body: { ...lesson, id: 32 } }),
    });
    await mountLessons();
    buttons('Add a lesson')[0]!.click();
    await settle();
    const body = document.querySelector<HTMLTextAreaElement>('textarea[name="body"]')!;
    body.value = 'Size the regulator for the motor inrush, not the average draw.';
    body.dispatchEvent(new Event('input'));
    await settle();
    buttons('Add')[0]!.click();
    await settle();
    expect(api.writes()).toEqual([
      {
        method: 'POST',
        url: '/api/projects/greenhouse-node/lessons',
        body: { body: 'Size the regulator for the motor inrush, not the average draw.', tags: [], errata: [] },
      },
    ]);
  });

  it('does not send an empty lesson and says what is missing', async () => {
    const api = fakeApi({
      'GET /api/projects/greenhouse-node/lessons': json(listAs(true)),
      'GET /api/projects/greenhouse-node/errata': json(errataList),
    });
    await mountLessons();
    buttons('Add a lesson')[0]!.click();
    await settle();
    buttons('Add')[0]!.click();
    await settle();
    expect(api.writes()).toEqual([]);
    expect(document.body.textContent).toContain('Lesson is required');
  });

  it('saves an edit on top of the revision the editor opened, with its tags and errata', async () => {
    const api = fakeApi({
      'GET /api/projects/greenhouse-node/lessons': json(listAs(true)),
      'GET /api/projects/greenhouse-node/errata': json(errataList),
      'PUT /api/projects/greenhouse-node/lessons/31': () => ({
        status: 200,
        body: { outcome: 'saved', lesson: { ...lesson, revision: 5 } },
      }),
    });
    await mountLessons();
    buttons('Edit')[0]!.click();
    await settle();
    const body = document.querySelector<HTMLTextAreaElement>('textarea[name="body"]')!;
    expect(body.value).toBe(lesson.body);
    body.value = 'Check the pin table before routing any output.';
    body.dispatchEvent(new Event('input'));
    await settle();
    buttons('Save')[0]!.click();
    await settle();
    expect(api.writes()).toEqual([
      {
        method: 'PUT',
        url: '/api/projects/greenhouse-node/lessons/31',
        body: {
          body: 'Check the pin table before routing any output.',
          tags: ['input-only pin', 'bodge wire'],
          errata: [1],
          baseRevision: 4,
        },
      },
    ]);
  });

  it('removes a lesson only after the editor confirms', async () => {
    const api = fakeApi({
      'GET /api/projects/greenhouse-node/lessons': json(listAs(true)),
      'DELETE /api/projects/greenhouse-node/lessons/31': () => ({ status: 204 }),
    });
    await mountLessons();
    buttons('Remove')[0]!.click();
    await settle();
    expect(api.writes()).toEqual([]);
    buttons('Remove').at(-1)!.click();
    await settle();
    expect(api.writes()).toEqual([
      { method: 'DELETE', url: '/api/projects/greenhouse-node/lessons/31', body: undefined },
    ]);
  });
});
