/**
 * Proposals: a contributor's suggested erratum or edit, and the owner's decision on it. Typed
 * calls for pages, plus the small pieces of wording and mapping the proposal views share (state
 * labels, erratum field labels, board ids shown as labels, where an accepted proposal now lives).
 */
import type {
  AcceptProposal,
  categoryListSchema,
  ErratumDetail,
  ErratumFields,
  ErratumFieldsInput,
  ProposalDecision,
  ProposalDetail,
  ProposalInput,
  ProposalList,
  ProposalSummary,
} from '@shared/contracts/errata';
import type { DocumentContent } from '@shared/contracts/projects';
import type { FieldValue } from '@shared/diff';
import {
  erratumStatusLabels,
  severityLabels,
  startingCategories,
  type ErratumStatus,
  type ProposalKind,
  type ProposalStatus,
  type Severity,
} from '@shared/domain';
import type { RouteLocationRaw } from 'vue-router';
import type { z } from 'zod';
import type { FieldErrors } from './form-errors';
import { http } from './http';

export type CategoryList = z.infer<typeof categoryListSchema>;

const pr = (id: number | string) => `/proposals/${encodeURIComponent(String(id))}`;

export const proposalsApi = {
  create: (slug: string, input: ProposalInput) =>
    http.post<ProposalDetail>(`/projects/${encodeURIComponent(slug)}/proposals`, input),
  listForProject: (slug: string, status?: ProposalStatus) =>
    http.get<ProposalList>(`/projects/${encodeURIComponent(slug)}/proposals`, { query: { status } }),
  reviewQueue: () => http.get<ProposalList>('/me/review-queue'),
  mine: () => http.get<ProposalList>('/me/proposals'),
  get: (id: number | string) => http.get<ProposalDetail>(pr(id)),
  accept: (id: number | string, input: AcceptProposal) => http.post<ProposalDecision>(`${pr(id)}/accept`, input),
  decline: (id: number | string, reason: string) => http.post<ProposalDecision>(`${pr(id)}/decline`, { reason }),
  withdraw: (id: number | string) => http.post<ProposalDecision>(`${pr(id)}/withdraw`),
  /** Erratum categories, for the erratum form (moderators may have added to the starting set). */
  categories: () => http.get<CategoryList>('/categories'),
  /** The erratum an edit is proposed for (prefills the form; its revision is the proposal's base). */
  erratum: (slug: string, number: number) =>
    http.get<ErratumDetail>(`/projects/${encodeURIComponent(slug)}/errata/${number}`),
};

/**
 * Field errors of a proposal as the forms show them: the schema and the server name erratum and
 * document fields `payload.title`; the forms know them as `title`.
 */
export function proposalFieldErrors(errors: FieldErrors): FieldErrors {
  const out: FieldErrors = {};
  for (const [key, messages] of Object.entries(errors)) {
    const field = key.startsWith('payload.') ? key.slice('payload.'.length) : key === 'payload' ? '_' : key;
    (out[field] ??= []).push(...messages);
  }
  return out;
}

// --- Wording ------------------------------------------------------------------------------------

/** Our own plain words for the states; the chip shows exactly these. */
export const proposalStatusLabels: Record<ProposalStatus, string> = {
  open: 'open',
  accepted: 'accepted',
  declined: 'declined',
  withdrawn: 'withdrawn',
};

/** Chip colours from our theme: only "accepted" and "declined" carry meaning in colour, and the word is always there. */
export const proposalStatusColors: Record<ProposalStatus, string | undefined> = {
  open: 'primary',
  accepted: 'success',
  declined: 'error',
  withdrawn: undefined,
};

export const proposalKindLabels: Record<ProposalKind, string> = {
  new_erratum: 'New erratum',
  erratum_edit: 'Erratum edit',
  document_edit: 'Write-up edit',
};

/** Erratum fields in reading order, as the diff and the proposed-erratum card label them. */
export const erratumFieldLabels: Record<keyof ErratumFields, string> = {
  title: 'Title',
  category: 'Category',
  severity: 'Severity',
  status: 'Status',
  affected: 'Affected board revisions',
  fixedIn: 'Fixed in',
  refdes: 'Reference designators',
  parts: 'Parts',
  pins: 'Pins',
  symptom: 'Symptom',
  cause: 'Cause',
  workaround: 'Workaround',
  fix: 'Fix',
  reportedByText: 'Reported by',
};

export const documentFieldLabels: Record<keyof DocumentContent, string> = {
  title: 'Title',
  body: 'Text',
  loggedOn: 'Date',
};

export interface BoardRef {
  id: number;
  label: string;
}
export interface CategoryRef {
  slug: string;
  name: string;
}

/**
 * A board id. The overlaps of an erratum proposal come in the stored revision form, where ids are
 * strings ("3", and "" for none), so both forms are read.
 */
const asNumber = (value: unknown): number | null => {
  if (typeof value === 'number' && Number.isFinite(value)) return value;
  if (typeof value === 'string' && /^\d{1,9}$/.test(value)) return Number(value);
  return null;
};
const asString = (value: unknown): string => (typeof value === 'string' ? value : '');
const asStrings = (value: unknown): string[] =>
  Array.isArray(value) ? value.filter((v): v is string => typeof v === 'string') : [];

/**
 * Erratum fields as a reader sees them: board ids as their labels ("Rev A"), severity, status and
 * category as words. An id the project no longer has is shown as "board #id", not dropped.
 */
export function displayErratumFields(
  fields: Record<string, unknown> | null | undefined,
  boards: readonly BoardRef[],
  categories: readonly CategoryRef[] = startingCategories,
): Record<string, FieldValue> {
  const f = fields ?? {};
  const board = (id: number) => boards.find((b) => b.id === id)?.label ?? `board #${id}`;
  const affected = Array.isArray(f.affected) ? f.affected.map(asNumber).filter((id): id is number => id !== null) : [];
  const fixedIn = asNumber(f.fixedIn);
  const category = asString(f.category);
  const severity = asString(f.severity);
  const status = asString(f.status);
  return {
    title: asString(f.title),
    category: category ? (categories.find((c) => c.slug === category)?.name ?? category) : '',
    severity: severity ? (severityLabels[severity as Severity] ?? severity) : '',
    status: status ? (erratumStatusLabels[status as ErratumStatus] ?? status) : '',
    affected: affected.map(board),
    fixedIn: fixedIn === null ? null : board(fixedIn),
    refdes: asStrings(f.refdes),
    parts: asStrings(f.parts),
    pins: asStrings(f.pins),
    symptom: asString(f.symptom),
    cause: asString(f.cause),
    workaround: asString(f.workaround),
    fix: asString(f.fix),
    reportedByText: asString(f.reportedByText),
  };
}

/** Erratum fields from a proposal's untyped record, ready for the erratum form. */
export function erratumFormValue(fields: Record<string, unknown> | null | undefined): ErratumFieldsInput {
  const f = fields ?? {};
  return {
    title: asString(f.title),
    category: asString(f.category),
    severity: (asString(f.severity) || 'minor') as Severity,
    status: (asString(f.status) || 'open') as ErratumStatus,
    affected: Array.isArray(f.affected) ? f.affected.map(asNumber).filter((id): id is number => id !== null) : [],
    fixedIn: asNumber(f.fixedIn),
    refdes: asStrings(f.refdes),
    parts: asStrings(f.parts),
    pins: asStrings(f.pins),
    symptom: asString(f.symptom),
    cause: asString(f.cause),
    workaround: asString(f.workaround),
    fix: asString(f.fix),
    reportedByText: asString(f.reportedByText),
  };
}

/** An erratum as the API shows it, as the form edits it (ids and slugs, not objects). */
export function erratumFromDetail(erratum: ErratumDetail): ErratumFieldsInput {
  return {
    title: erratum.title,
    category: erratum.category.slug,
    severity: erratum.severity,
    status: erratum.status,
    affected: erratum.affected.map((b) => b.id),
    fixedIn: erratum.fixedIn?.id ?? null,
    refdes: [...erratum.refdes],
    parts: [...erratum.parts],
    pins: [...erratum.pins],
    symptom: erratum.symptom,
    cause: erratum.cause,
    workaround: erratum.workaround,
    fix: erratum.fix,
    reportedByText: erratum.reportedByText,
  };
}

/** Document fields from a proposal's untyped record. `loggedOn` is null for write-up sections. */
export function documentValue(fields: Record<string, unknown> | null | undefined): DocumentContent {
  const f = fields ?? {};
  return {
    title: asString(f.title),
    body: asString(f.body),
    loggedOn: typeof f.loggedOn === 'string' ? f.loggedOn : null,
  };
}

/** "E3" for erratum 3. */
export const erratumCode = (n: number) => `E${n}`;

/** The number in "E3" or "3"; null for anything else. */
export function parseErratumCode(code: string): number | null {
  const match = /^[Ee]?(\d{1,6})$/.exec(code.trim());
  return match ? Number(match[1]) : null;
}

/**
 * Where the proposal's target lives, for a link: the erratum, the log entry, or the section on the
 * project page. A new erratum that is not accepted has no page of its own yet: the project.
 * `isLogEntry` comes from the detail's fields (`loggedOn` is set only on log entries).
 */
export function targetLocation(
  proposal: Pick<ProposalSummary, 'projectSlug' | 'target'>,
  isLogEntry = false,
): RouteLocationRaw {
  const slug = proposal.projectSlug;
  const { erratumNumber, documentId } = proposal.target;
  if (erratumNumber !== null) return { name: 'erratum', params: { slug, code: erratumCode(erratumNumber) } };
  if (documentId !== null) {
    return isLogEntry
      ? { name: 'log-entry', params: { slug, documentId } }
      : { name: 'project', params: { slug }, hash: `#section-${documentId}` };
  }
  return { name: 'project', params: { slug } };
}

/** Where accepted content now lives, from an accept's `result`. */
export function resultLocation(decision: ProposalDecision): RouteLocationRaw | null {
  const { result, proposal } = decision;
  if (!result) return null;
  const slug = proposal.projectSlug;
  if (result.erratumNumber !== null) {
    return { name: 'erratum', params: { slug, code: erratumCode(result.erratumNumber) } };
  }
  if (result.documentId !== null) {
    return isLogEntryProposal(proposal)
      ? { name: 'log-entry', params: { slug, documentId: result.documentId } }
      : { name: 'project', params: { slug }, hash: `#section-${result.documentId}` };
  }
  return null;
}

/** A document proposal is about a log entry when its content carries a date. */
export function isLogEntryProposal(proposal: Pick<ProposalDetail, 'kind' | 'current' | 'proposed'>): boolean {
  if (proposal.kind !== 'document_edit') return false;
  const dated = (fields: Record<string, unknown> | null) => typeof fields?.loggedOn === 'string';
  return dated(proposal.current) || dated(proposal.proposed);
}

/** What the proposal is about, in a few words: "New erratum", "Edit to E3 Relay never switches". */
export function proposalTitle(proposal: Pick<ProposalSummary, 'kind' | 'target'>): string {
  if (proposal.kind === 'new_erratum') {
    // Before it is accepted the server already says "New erratum: <title>"; after, "E7 <title>".
    const label = proposal.target.label;
    if (!label) return 'New erratum';
    return /^New erratum\b/.test(label) ? label : `New erratum ${label}`;
  }
  return `Edit to ${proposal.target.label}`;
}
