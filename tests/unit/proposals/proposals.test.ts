/**
 * The pure pieces of the proposal views: titles from the server's target labels, erratum fields as
 * a reader sees them, form errors without the `payload.` prefix, and where a link leads.
 */
import type { ProposalDecision, ProposalDetail } from '@shared/contracts/errata';
import { describe, expect, it } from 'vitest';
import {
  displayErratumFields,
  erratumFormValue,
  parseErratumCode,
  proposalFieldErrors,
  proposalTitle,
  resultLocation,
  targetLocation,
} from '@/composables/proposals';

const boards = [
  { id: 4, label: 'Rev A' },
  { id: 9, label: 'Rev B' },
];

describe('proposalTitle', () => {
  it('uses the server’s label for a new erratum as it is, and names edits by their target', () => {
    const target = { kind: 'new_erratum' as const, erratumNumber: null, documentId: null };
    expect(proposalTitle({ kind: 'new_erratum', target: { ...target, label: 'New erratum: Vent stays open' } })).toBe(
      'New erratum: Vent stays open',
    );
    expect(
      proposalTitle({ kind: 'new_erratum', target: { ...target, erratumNumber: 7, label: 'E7 Vent stays open' } }),
    ).toBe('New erratum E7 Vent stays open');
    expect(
      proposalTitle({
        kind: 'document_edit',
        target: { kind: 'document_edit', erratumNumber: null, documentId: 3, label: 'Hardware' },
      }),
    ).toBe('Edit to Hardware');
  });
});

describe('displayErratumFields', () => {
  it('shows board ids as their labels and enumerations as words', () => {
    const shown = displayErratumFields(
      {
        title: 'Relay never switches',
        category: 'pin-capability',
        severity: 'critical',
        status: 'workaround',
        affected: [9, 4],
        fixedIn: 9,
      },
      boards,
    );
    expect(shown.affected).toEqual(['Rev B', 'Rev A']);
    expect(shown.fixedIn).toBe('Rev B');
    expect(shown.category).toBe('Pin capability');
    expect(shown.severity).toBe('Critical — board does not work without rework');
    expect(shown.status).toBe('Workaround available');
  });

  it('reads board ids in the stored revision form ("4", "" for none) and keeps unknown ids visible', () => {
    const shown = displayErratumFields({ affected: ['4', '12'], fixedIn: '' }, boards);
    expect(shown.affected).toEqual(['Rev A', 'board #12']);
    expect(shown.fixedIn).toBeNull();
    expect(erratumFormValue({ affected: ['4'], fixedIn: '9' })).toMatchObject({ affected: [4], fixedIn: 9 });
  });
});

describe('proposalFieldErrors', () => {
  it('names payload fields as the forms know them', () => {
    expect(
      proposalFieldErrors({ 'payload.title': ['Title is required'], 'payload.refdes.2': ['too long'], message: ['x'] }),
    ).toEqual({
      title: ['Title is required'],
      'refdes.2': ['too long'],
      message: ['x'],
    });
  });
});

describe('parseErratumCode', () => {
  it('reads E3, e3 and 3, and nothing else', () => {
    expect([parseErratumCode('E3'), parseErratumCode('e3'), parseErratumCode('3')]).toEqual([3, 3, 3]);
    expect([parseErratumCode('E'), parseErratumCode('E3b'), parseErratumCode('new')]).toEqual([null, null, null]);
  });
});

describe('targetLocation and resultLocation', () => {
  const summary = { projectSlug: 'greenhouse-vent' };

  it('leads to the erratum, the log entry or the section on the project page', () => {
    expect(
      targetLocation({ ...summary, target: { kind: 'erratum_edit', erratumNumber: 3, documentId: null, label: 'E3' } }),
    ).toEqual({ name: 'erratum', params: { slug: 'greenhouse-vent', code: 'E3' } });
    const doc = {
      ...summary,
      target: { kind: 'document_edit' as const, erratumNumber: null, documentId: 7, label: 'Day 2' },
    };
    expect(targetLocation(doc, true)).toEqual({
      name: 'log-entry',
      params: { slug: 'greenhouse-vent', documentId: 7 },
    });
    expect(targetLocation(doc, false)).toEqual({
      name: 'project',
      params: { slug: 'greenhouse-vent' },
      hash: '#section-7',
    });
  });

  it('leads an accepted new erratum to the erratum it became', () => {
    const decision = {
      proposal: {
        projectSlug: 'greenhouse-vent',
        kind: 'new_erratum',
        current: null,
        proposed: {},
      } as unknown as ProposalDetail,
      result: { erratumNumber: 8, documentId: null, revision: 1 },
    } as ProposalDecision;
    expect(resultLocation(decision)).toEqual({ name: 'erratum', params: { slug: 'greenhouse-vent', code: 'E8' } });
  });
});
