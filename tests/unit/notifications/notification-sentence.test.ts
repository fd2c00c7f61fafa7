/**
 * Each notification reads as one sentence of our own, built from its kind and payload; the second
 * line carries a decline's reason or a comment's opening; only app-relative paths are opened.
 */
import type { Notification, NotificationPayload } from '@shared/contracts/errata';
import { describe, expect, it } from 'vitest';
import { notificationDetail, notificationPath, notificationSentence, unreadFirst } from '@/composables/notifications';

const actor = { handle: 'bram-tolliver', displayName: 'Bram Tolliver' };
const project = { projectSlug: 'greenhouse-vent', projectTitle: 'Greenhouse vent controller' };

function note(
  kind: Notification['kind'],
  payload: Partial<NotificationPayload>,
  over: Partial<Notification> = {},
): Notification {
  return {
    id: 1,
    kind,
    payload: { ...project, actor, path: '/proposals/12', ...payload },
    read: false,
    createdAt: '2026-03-01T10:00:00.000Z',
    ...over,
  };
}

describe('notificationSentence', () => {
  it('says who proposed a new erratum, and on which project', () => {
    expect(notificationSentence(note('proposal_received', { proposalId: 12, proposalKind: 'new_erratum' }))).toBe(
      'Bram Tolliver proposed a new erratum on Greenhouse vent controller',
    );
  });

  it('names the target of a proposed edit', () => {
    const n = note('proposal_received', {
      proposalId: 12,
      proposalKind: 'erratum_edit',
      targetLabel: 'E3 Relay never switches',
    });
    expect(notificationSentence(n)).toBe(
      'Bram Tolliver proposed an edit to E3 Relay never switches on Greenhouse vent controller',
    );
    const doc = note('proposal_received', { proposalId: 13, proposalKind: 'document_edit', targetLabel: 'Hardware' });
    expect(notificationSentence(doc)).toBe('Bram Tolliver proposed an edit to Hardware on Greenhouse vent controller');
  });

  it('tells the contributor their proposal was accepted', () => {
    const n = note('proposal_decided', {
      actor: { handle: 'odile-fenn', displayName: 'Odile Fenn' },
      proposalId: 12,
      proposalKind: 'document_edit',
      targetLabel: 'Power',
      decision: 'accepted',
    });
    expect(notificationSentence(n)).toBe(
      'Odile Fenn accepted your proposed edit to Power on Greenhouse vent controller',
    );
    expect(notificationDetail(n)).toBeNull();
  });

  it('tells the contributor their proposal was declined, with the reason on the second line', () => {
    const n = note('proposal_decided', {
      actor: { handle: 'odile-fenn', displayName: 'Odile Fenn' },
      proposalId: 12,
      proposalKind: 'new_erratum',
      decision: 'declined',
      reason: 'Same as E2.',
    });
    expect(notificationSentence(n)).toBe('Odile Fenn declined your proposed erratum on Greenhouse vent controller');
    expect(notificationDetail(n)).toBe('Reason: Same as E2.');
  });

  it('says where a comment was written: a proposal or an erratum', () => {
    const onProposal = note('comment', { proposalId: 12, targetLabel: 'Power', excerpt: 'Which regulator part?' });
    expect(notificationSentence(onProposal)).toBe(
      'Bram Tolliver commented on the proposal for Power on Greenhouse vent controller',
    );
    expect(notificationDetail(onProposal)).toBe('Which regulator part?');
    const onErratum = note('comment', {
      erratumNumber: 3,
      erratumTitle: 'Relay never switches',
      path: '/projects/greenhouse-vent/errata/E3',
    });
    expect(notificationSentence(onErratum)).toBe(
      'Bram Tolliver commented on E3 Relay never switches on Greenhouse vent controller',
    );
  });

  it('announces a new erratum on a followed project with its number and title', () => {
    const n = note('new_erratum', { erratumNumber: 4, erratumTitle: 'Vent servo browns out the 3.3 V rail' });
    expect(notificationSentence(n)).toBe(
      'Bram Tolliver recorded a new erratum on Greenhouse vent controller: E4 Vent servo browns out the 3.3 V rail',
    );
  });

  it('falls back to the handle when the actor has no display name', () => {
    const n = note('proposal_received', {
      actor: { handle: 'bram-tolliver', displayName: ' ' },
      proposalKind: 'new_erratum',
    });
    expect(notificationSentence(n)).toBe('@bram-tolliver proposed a new erratum on Greenhouse vent controller');
  });
});

describe('notificationPath', () => {
  it('opens app-relative paths only', () => {
    expect(notificationPath(note('comment', { path: '/proposals/12' }))).toBe('/proposals/12');
    expect(notificationPath(note('comment', { path: '//elsewhere.example/x' }))).toBeNull();
    expect(notificationPath(note('comment', { path: 'https://elsewhere.example/x' }))).toBeNull();
  });
});

describe('unreadFirst', () => {
  it('puts unread notifications first, newest first within each group', () => {
    const items = [
      note('comment', {}, { id: 1, read: true, createdAt: '2026-03-05T00:00:00.000Z' }),
      note('comment', {}, { id: 2, read: false, createdAt: '2026-03-01T00:00:00.000Z' }),
      note('comment', {}, { id: 3, read: false, createdAt: '2026-03-03T00:00:00.000Z' }),
      note('comment', {}, { id: 4, read: true, createdAt: '2026-03-02T00:00:00.000Z' }),
    ];
    expect(unreadFirst(items).map((n) => n.id)).toEqual([3, 2, 1, 4]);
  });
});

describe('notificationSentence with the labels the server gives a new erratum', () => {
  it('names a not yet numbered erratum by its title alone', () => {
    const decided = note('proposal_decided', {
      actor: { handle: 'odile-fenn', displayName: 'Odile Fenn' },
      proposalId: 9,
      proposalKind: 'new_erratum',
      targetLabel: 'New erratum: Vent stays open after a power cut',
      decision: 'accepted',
    });
    expect(notificationSentence(decided)).toBe(
      'Odile Fenn accepted your proposed erratum Vent stays open after a power cut on Greenhouse vent controller',
    );
    const comment = note('comment', {
      proposalId: 9,
      proposalKind: 'new_erratum',
      targetLabel: 'New erratum: Vent stays open after a power cut',
    });
    expect(notificationSentence(comment)).toBe(
      'Bram Tolliver commented on the proposed erratum Vent stays open after a power cut on Greenhouse vent controller',
    );
  });
});
