// @vitest-environment happy-dom
/**
 * What an erratum proposal changes, as the reviewer sees it: board ids as labels, the merge onto
 * what is stored now by default, the proposal as written one toggle away, and a new erratum as a card.
 */
import '../editor/vuetify-env';
import type { ProposalDetail } from '@shared/contracts/errata';
import { mount, type VueWrapper } from '@vue/test-utils';
import { afterEach, describe, expect, it } from 'vitest';
import { nextTick } from 'vue';
import { createVuetify } from 'vuetify';
import ProposalReview from '@/components/proposals/ProposalReview.vue';
import { people } from './fake-server';

const erratum = {
  title: 'Relay never switches',
  category: 'pin-capability',
  severity: 'major',
  status: 'open',
  affected: [4],
  fixedIn: null,
  refdes: ['K1'],
  parts: [],
  pins: ['A6'],
  symptom: 'The relay never clicks.',
  cause: 'A6 is input-only.',
  workaround: '',
  fix: '',
  reportedByText: '',
};

function detail(over: Partial<ProposalDetail> = {}): ProposalDetail {
  return {
    id: 5,
    projectSlug: 'greenhouse-vent',
    projectTitle: 'Greenhouse vent controller',
    kind: 'erratum_edit',
    target: { kind: 'erratum_edit', erratumNumber: 3, documentId: null, label: 'E3 Relay never switches' },
    status: 'open',
    author: people.contributor,
    message: '',
    decidedBy: null,
    decidedAt: null,
    decisionReason: null,
    commentCount: 0,
    createdAt: '2026-03-01T10:00:00.000Z',
    baseRevision: 2,
    currentRevision: 3,
    // Since revision 2 the owner changed the status; the contributor added Rev B and a workaround.
    base: erratum,
    proposed: { ...erratum, affected: [4, 9], workaround: 'Bodge A6 to D7.' },
    current: { ...erratum, status: 'workaround' },
    forward: {
      clean: true,
      fields: { ...erratum, status: 'workaround', affected: [4, 9], workaround: 'Bodge A6 to D7.' },
      conflicts: [],
    },
    boards: [
      { id: 4, label: 'Rev A' },
      { id: 9, label: 'Rev B' },
    ],
    viewer: { canReview: true, canWithdraw: false, canComment: true },
    ...over,
  };
}

let wrapper: VueWrapper | null = null;
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  document.body.innerHTML = '';
});

function mountReview(proposal: ProposalDetail) {
  wrapper = mount(ProposalReview, {
    props: { proposal },
    global: { plugins: [createVuetify()] },
    attachTo: document.body,
  });
  return wrapper;
}

const changedFields = (w: VueWrapper) =>
  w.findAll('[data-testid="erratum-diff"] [data-field]').map((f) => f.attributes('data-field'));

describe('ProposalReview', () => {
  it('shows what accepting would change on top of what is stored now, with boards by label', () => {
    const w = mountReview(detail());
    expect(w.find('[data-testid="moved-on-note"]').text()).toContain('revision 2');
    expect(changedFields(w)).toEqual(['affected', 'workaround']);
    expect(w.get('[data-field="affected"] [data-change="added"]').text()).toContain('Rev B');
  });

  it('shows the proposal as written (base → proposed) when asked', async () => {
    const w = mountReview(detail());
    await w.get('[data-testid="view-original"]').trigger('click');
    await nextTick();
    // The status change was the owner's, so it is not part of the proposal as written.
    expect(changedFields(w)).toEqual(['affected', 'workaround']);
    await w.setProps({ proposal: detail({ proposed: { ...erratum, title: 'Relay on A6 never switches' } }) });
    expect(changedFields(w)).toEqual(['title']);
  });

  it('offers no toggle when the target has not moved on', () => {
    const w = mountReview(detail({ currentRevision: 2, current: erratum }));
    expect(w.find('[data-testid="moved-on-note"]').exists()).toBe(false);
    expect(w.find('[data-testid="view-original"]').exists()).toBe(false);
  });

  it('shows a proposed new erratum as a card with its fields in words', () => {
    const w = mountReview(
      detail({
        kind: 'new_erratum',
        baseRevision: null,
        currentRevision: null,
        base: null,
        current: null,
        proposed: erratum,
      }),
    );
    expect(w.get('[data-field="title"]').text()).toBe('Relay never switches');
    expect(w.get('[data-field="affected"] dd').text()).toBe('Rev A');
    expect(w.get('[data-field="category"] dd').text()).toBe('Pin capability');
    expect(w.get('[data-field="cause"]').text()).toContain('A6 is input-only.');
  });
});
