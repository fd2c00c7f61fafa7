// @vitest-environment happy-dom
/**
 * The proposal page against a fake API: who sees which actions, what accept, decline and withdraw
 * send, and what the page does when someone else decided first or the target moved on.
 */
import '../editor/vuetify-env';
import type { ProposalDetail } from '@shared/contracts/errata';
import { flushPromises, mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { defineComponent, h } from 'vue';
import { createMemoryHistory, createRouter, RouterView } from 'vue-router';
import { createVuetify } from 'vuetify';
import ProposalPage from '@/pages/ProposalPage.vue';
import { useNotifierStore } from '@/stores/notifier';
import { useSessionStore } from '@/stores/session';
import { fail, fakeServer, ok, people, signedInAs } from './fake-server';

// An invented write-up section: the contributor proposed against revision 3; the owner has saved
// revision 4 since (a new last line), which the server merged the proposal onto.
const base = { title: 'Power', body: 'The regulator is an LDO.\nIt runs warm.\n', loggedOn: null };
const proposed = { title: 'Power', body: 'The regulator is an LDO.\nIt runs hot above 400 mA.\n', loggedOn: null };
const current = { title: 'Power', body: 'The regulator is an LDO.\nIt runs warm.\nFit a heatsink.\n', loggedOn: null };
const forward = {
  title: 'Power',
  body: 'The regulator is an LDO.\nIt runs hot above 400 mA.\nFit a heatsink.\n',
  loggedOn: null,
};

function detail(over: Partial<ProposalDetail> = {}): ProposalDetail {
  return {
    id: 12,
    projectSlug: 'greenhouse-vent',
    projectTitle: 'Greenhouse vent controller',
    kind: 'document_edit',
    target: { kind: 'document_edit', erratumNumber: null, documentId: 7, label: 'Power' },
    status: 'open',
    author: people.contributor,
    message: 'Measured it with a thermocouple.',
    decidedBy: null,
    decidedAt: null,
    decisionReason: null,
    commentCount: 0,
    createdAt: '2026-03-01T10:00:00.000Z',
    baseRevision: 3,
    currentRevision: 4,
    base,
    proposed,
    current,
    forward: { clean: true, fields: forward, conflicts: [] },
    boards: [],
    viewer: { canReview: true, canWithdraw: false, canComment: true },
    ...over,
  };
}

const reviewer = { canReview: true, canWithdraw: false, canComment: true };
const proposer = { canReview: false, canWithdraw: true, canComment: true };
const reader = { canReview: false, canWithdraw: false, canComment: false };

const API = '/api/proposals/12';

function serve(first: ProposalDetail) {
  return fakeServer({
    [`GET ${API}`]: ok(first),
    [`GET ${API}/comments`]: ok({ items: [], canComment: first.viewer.canComment }),
  });
}

const Stub = defineComponent({ render: () => h('p', 'elsewhere') });

let wrapper: VueWrapper | null = null;

beforeEach(() => {
  setActivePinia(createPinia());
  useSessionStore().user = signedInAs(people.maker);
});
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  document.body.innerHTML = '';
  vi.unstubAllGlobals();
});

async function openPage() {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/proposals/:proposalId', name: 'proposal', component: ProposalPage },
      { path: '/projects/:slug', name: 'project', component: Stub },
      { path: '/projects/:slug/log/:documentId', name: 'log-entry', component: Stub },
      { path: '/projects/:slug/errata/:code', name: 'erratum', component: Stub },
    ],
  });
  await router.push('/proposals/12');
  wrapper = mount(RouterView, { global: { plugins: [router, createVuetify()] }, attachTo: document.body });
  await flushPromises();
  return wrapper;
}

const button = (testid: string) => document.querySelector<HTMLButtonElement>(`[data-testid="${testid}"]`);
const notices = () => useNotifierStore().queue.map((n) => n.text);

describe('ProposalPage', () => {
  it('shows who proposed what, the message and the state in our words', async () => {
    serve(detail());
    const page = await openPage();
    expect(page.get('h1').text()).toBe('Edit to Power');
    expect(page.text()).toContain('Bram Tolliver');
    expect(page.get('[data-testid="message"]').text()).toBe('Measured it with a thermocouple.');
    expect(page.get('[data-testid="status"]').text()).toBe('open');
  });

  it('offers accept, edit-then-accept and decline to a reviewer, and no withdraw', async () => {
    serve(detail({ viewer: reviewer }));
    await openPage();
    expect(button('accept')).not.toBeNull();
    expect(button('edit-accept')).not.toBeNull();
    expect(button('decline')).not.toBeNull();
    expect(button('withdraw')).toBeNull();
  });

  it('offers only withdraw to the contributor', async () => {
    serve(detail({ viewer: proposer }));
    await openPage();
    expect(button('accept')).toBeNull();
    expect(button('decline')).toBeNull();
    expect(button('withdraw')).not.toBeNull();
  });

  it('offers no action to a reader, nor on a decided proposal', async () => {
    serve(detail({ viewer: reader }));
    await openPage();
    expect(document.querySelector('[data-testid="actions"]')).toBeNull();

    wrapper?.unmount();
    serve(
      detail({
        viewer: reviewer,
        status: 'declined',
        decidedBy: people.maker,
        decidedAt: '2026-03-03T10:00:00.000Z',
        decisionReason: 'The Rev B board has a different regulator.',
      }),
    );
    const page = await openPage();
    expect(document.querySelector('[data-testid="actions"]')).toBeNull();
    expect(page.get('[data-testid="decision"]').text()).toContain('Declined by Odile Fenn');
    expect(page.get('[data-testid="decision-reason"]').text()).toBe(
      'Reason: The Rev B board has a different regulator.',
    );
  });

  it('accepts with the revision the reviewer looked at as the base, after a confirmation', async () => {
    const server = serve(detail());
    server.answer(`POST ${API}/accept`, () => ({
      status: 200,
      body: {
        proposal: detail({ status: 'accepted', decidedBy: people.maker, decidedAt: '2026-03-04T10:00:00.000Z' }),
        result: { erratumNumber: null, documentId: 7, revision: 5 },
      },
    }));
    const page = await openPage();
    button('accept')!.click();
    await flushPromises();
    expect(server.writes()).toHaveLength(0);
    button('confirm')!.click();
    await flushPromises();

    expect(server.writes()).toEqual([{ method: 'POST', url: `${API}/accept`, body: { message: '', baseRevision: 4 } }]);
    expect(page.get('[data-testid="status"]').text()).toBe('accepted');
    const link = page.get('[data-testid="result-link"]');
    expect(link.attributes('href')).toBe('/projects/greenhouse-vent#section-7');
  });

  it('declines only with a reason, and sends the reason', async () => {
    const server = serve(detail());
    server.answer(`POST ${API}/decline`, (call) => ({
      status: 200,
      body: {
        proposal: detail({
          status: 'declined',
          decidedBy: people.maker,
          decidedAt: '2026-03-04T10:00:00.000Z',
          decisionReason: (call.body as { reason: string }).reason,
        }),
        result: null,
      },
    }));
    const page = await openPage();
    button('decline')!.click();
    await flushPromises();

    button('confirm-decline')!.click();
    await flushPromises();
    expect(server.writes()).toHaveLength(0);
    expect(document.body.textContent).toContain('Reason is required');

    const reason = document.querySelector<HTMLTextAreaElement>('[data-testid="decline-reason"] textarea')!;
    reason.value = 'The heatsink note already covers it.';
    reason.dispatchEvent(new Event('input'));
    await flushPromises();
    button('confirm-decline')!.click();
    await flushPromises();

    expect(server.writes()).toEqual([
      { method: 'POST', url: `${API}/decline`, body: { reason: 'The heatsink note already covers it.' } },
    ]);
    expect(page.get('[data-testid="decision-reason"]').text()).toBe('Reason: The heatsink note already covers it.');
  });

  it('withdraws for the contributor', async () => {
    const server = serve(detail({ viewer: proposer }));
    server.answer(
      `POST ${API}/withdraw`,
      ok({ proposal: detail({ status: 'withdrawn', viewer: proposer }), result: null }),
    );
    const page = await openPage();
    button('withdraw')!.click();
    await flushPromises();
    button('confirm')!.click();
    await flushPromises();
    expect(server.writes().map((c) => c.url)).toEqual([`${API}/withdraw`]);
    expect(page.get('[data-testid="status"]').text()).toBe('withdrawn');
  });

  it('says who decided first when the server answers 409 conflict, and shows their decision', async () => {
    const server = serve(detail());
    server.answer(`POST ${API}/accept`, () => {
      // Meanwhile an editor declined it: the reload shows that.
      server.answer(
        `GET ${API}`,
        ok(
          detail({
            status: 'declined',
            decidedBy: people.editor,
            decidedAt: '2026-03-04T09:59:00.000Z',
            decisionReason: 'Covered by E2.',
          }),
        ),
      );
      return fail(409, 'conflict', 'This proposal was already decided.')({} as never);
    });
    const page = await openPage();
    button('accept')!.click();
    await flushPromises();
    button('confirm')!.click();
    await flushPromises();

    expect(notices()).toContain('Already decided by Wren Okafor: this proposal is declined.');
    expect(page.get('[data-testid="status"]').text()).toBe('declined');
    expect(button('accept')).toBeNull();
  });

  it('switches to edit-then-accept with the overlaps when the target moved on (409 edit_conflict)', async () => {
    const server = serve(detail());
    const overlapping = detail({
      currentRevision: 5,
      current: { ...current, body: 'The regulator is an LDO.\nIt runs warm at 300 mA.\nFit a heatsink.\n' },
      forward: {
        clean: false,
        fields: { ...forward, body: 'The regulator is an LDO.\nIt runs warm at 300 mA.\nFit a heatsink.\n' },
        conflicts: [
          {
            field: 'body',
            base: base.body,
            ours: proposed.body,
            theirs: 'The regulator is an LDO.\nIt runs warm at 300 mA.\nFit a heatsink.\n',
          },
        ],
      },
    });
    server.answer(`POST ${API}/accept`, () => {
      server.answer(`GET ${API}`, ok(overlapping));
      return fail(409, 'edit_conflict', 'The section changed meanwhile.')({} as never);
    });
    const page = await openPage();
    button('accept')!.click();
    await flushPromises();
    button('confirm')!.click();
    await flushPromises();

    expect(page.find('[data-testid="edit-conflict-note"]').exists()).toBe(true);
    const conflict = page.get('[data-testid="conflicts"] [data-field="body"]');
    expect(conflict.text()).toContain('It runs hot above 400 mA.');
    expect(conflict.text()).toContain('It runs warm at 300 mA.');
    expect(button('accept')).toBeNull();
  });
});
