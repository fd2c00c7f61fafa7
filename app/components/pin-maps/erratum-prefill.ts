/**
 * A finding becomes an erratum in one click: the pin maps page builds the draft and hands it to
 * the erratum form through the navigation's history state (not the URL: the texts are long and
 * would end up in logs and shared links). The form reads it once, for a new erratum only, and the
 * maker reviews it before anything is saved.
 */
import type { ErratumFieldsInput } from '@shared/contracts/errata';
import type { ErratumDraft } from '@shared/checks/pins';
import { severities } from '@shared/domain';

export const ERRATUM_PREFILL_STATE_KEY = 'erratumPrefill';

export type ErratumPrefill = Pick<
  Required<ErratumFieldsInput>,
  'title' | 'category' | 'severity' | 'status' | 'symptom' | 'cause' | 'fix' | 'parts' | 'pins' | 'affected'
>;

/** The erratum fields for a draft from the pin check, on the pin map's board revision. */
export function prefillFromDraft(draft: ErratumDraft, boardRevisionId: number): ErratumPrefill {
  return {
    title: draft.title,
    category: draft.category,
    severity: draft.severity,
    status: 'open',
    symptom: draft.symptom,
    cause: draft.cause,
    fix: draft.fix,
    parts: [...draft.location.parts],
    pins: [...draft.location.pins],
    affected: [boardRevisionId],
  };
}

/** The history state a navigation carries the prefill in. */
export function prefillState(prefill: ErratumPrefill): Record<string, ErratumPrefill> {
  return { [ERRATUM_PREFILL_STATE_KEY]: prefill };
}

const isStrings = (v: unknown): v is string[] => Array.isArray(v) && v.every((s) => typeof s === 'string');

/**
 * The prefill in a history state, if there is a well-formed one. History state outlives the page
 * (reloads, back/forward), so it is checked rather than trusted.
 */
export function readErratumPrefill(state: unknown): ErratumPrefill | null {
  if (typeof state !== 'object' || state === null) return null;
  const value = (state as Record<string, unknown>)[ERRATUM_PREFILL_STATE_KEY];
  if (typeof value !== 'object' || value === null) return null;
  const v = value as Record<string, unknown>;
  const texts = ['title', 'category', 'symptom', 'cause', 'fix'] as const;
  if (!texts.every((key) => typeof v[key] === 'string')) return null;
  if (!isStrings(v.parts) || !isStrings(v.pins)) return null;
  if (!Array.isArray(v.affected) || !v.affected.every((id) => Number.isInteger(id) && (id as number) > 0)) return null;
  if (!(severities as readonly unknown[]).includes(v.severity)) return null;
  return {
    title: v.title as string,
    category: v.category as string,
    severity: v.severity as ErratumPrefill['severity'],
    status: 'open',
    symptom: v.symptom as string,
    cause: v.cause as string,
    fix: v.fix as string,
    parts: [...v.parts],
    pins: [...v.pins],
    affected: [...(v.affected as number[])],
  };
}
