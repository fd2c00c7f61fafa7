/**
 * An erratum's editable fields in their three shapes: as the API shows an erratum (board and
 * category objects), as a form and a save carry them (`ErratumFieldsInput`: ids and slugs), and
 * as revisions store them (every value a string or a list of strings: board ids as "3", no
 * fixed-in revision as ""). These functions turn one into another, and into what a history
 * diff shows a reader (labels, not ids).
 */
import type { Erratum, ErratumFieldsInput } from '@shared/contracts/errata';
import type { FieldValue } from '@shared/diff';
import {
  erratumStatuses,
  erratumStatusLabels,
  severities,
  severityLabels,
  type ErratumStatus,
  type Severity,
} from '@shared/domain';
import type { BoardRef } from './filter';

/** Field labels in reading order (history diffs, conflict choices). */
export const erratumFieldLabels = {
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
} as const;
export type ErratumFieldName = keyof typeof erratumFieldLabels;

/** The Markdown fields: merged line by line on a conflict, diffed by words in the history. */
export const erratumTextFields = ['symptom', 'cause', 'workaround', 'fix'] as const;
export type ErratumTextField = (typeof erratumTextFields)[number];

/** A form for a new erratum: nothing chosen yet but a sensible severity and status. */
export function blankErratumFields(): Required<ErratumFieldsInput> {
  return {
    title: '',
    category: '',
    severity: 'minor',
    status: 'open',
    affected: [],
    fixedIn: null,
    refdes: [],
    parts: [],
    pins: [],
    symptom: '',
    cause: '',
    workaround: '',
    fix: '',
    reportedByText: '',
  };
}

/** The form's values for an erratum as the API shows it. */
export function fieldsOfErratum(erratum: Erratum): Required<ErratumFieldsInput> {
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

const text = (value: unknown): string => (typeof value === 'string' ? value : '');
const list = (value: unknown): string[] =>
  Array.isArray(value) ? value.filter((v): v is string => typeof v === 'string') : [];
const boardId = (value: unknown): number | null => {
  if (typeof value === 'number' && Number.isInteger(value) && value > 0) return value;
  if (typeof value === 'string' && /^\d+$/.test(value) && Number(value) > 0) return Number(value);
  return null;
};

/** One stored value (a revision's, a conflict's) in the form's shape. */
export function storedValue(field: ErratumFieldName, value: unknown): unknown {
  switch (field) {
    case 'affected':
      return Array.isArray(value)
        ? [...new Set(value.map(boardId).filter((id): id is number => id !== null))].sort((a, b) => a - b)
        : [];
    case 'fixedIn':
      return boardId(value);
    case 'refdes':
    case 'parts':
    case 'pins':
      return list(value);
    case 'severity':
      return (severities as readonly string[]).includes(text(value)) ? value : 'minor';
    case 'status':
      return (erratumStatuses as readonly string[]).includes(text(value)) ? value : 'open';
    default:
      return text(value);
  }
}

/** A stored record (a revision's fields, a conflict's `current.fields`) in the form's shape. */
export function fieldsOfStored(record: Record<string, unknown>): Required<ErratumFieldsInput> {
  const out = blankErratumFields() as Record<ErratumFieldName, unknown>;
  for (const field of Object.keys(erratumFieldLabels) as ErratumFieldName[]) {
    if (field in record) out[field] = storedValue(field, record[field]);
  }
  return out as Required<ErratumFieldsInput>;
}

export interface FieldNames {
  boards: readonly BoardRef[];
  categories: readonly { slug: string; name: string }[];
}

/**
 * One value as a reader sees it: board and category names, severity and status words. Board ids
 * no longer in the project show as "removed revision #7" rather than vanishing.
 */
export function displayValue(field: ErratumFieldName, value: unknown, names: FieldNames): FieldValue {
  const board = (id: number) => names.boards.find((b) => b.id === id)?.label ?? `removed revision #${id}`;
  const v = storedValue(field, value);
  switch (field) {
    case 'affected':
      return (v as number[]).map(board);
    case 'fixedIn':
      return v === null ? '' : board(v as number);
    case 'category':
      return names.categories.find((c) => c.slug === v)?.name ?? (v as string);
    case 'severity':
      return severityLabels[v as Severity];
    case 'status':
      return erratumStatusLabels[v as ErratumStatus];
    default:
      return v as FieldValue;
  }
}

/** A revision's fields as the history diff shows them; absent fields count as empty. */
export function fieldsForDiff(
  record: Record<string, unknown> | null | undefined,
  names: FieldNames,
): Record<ErratumFieldName, FieldValue> {
  const fields = record ?? {};
  const out = {} as Record<ErratumFieldName, FieldValue>;
  for (const field of Object.keys(erratumFieldLabels) as ErratumFieldName[]) {
    if (!(field in fields)) {
      out[field] = ['affected', 'refdes', 'parts', 'pins'].includes(field) ? [] : '';
      continue;
    }
    out[field] = displayValue(field, fields[field], names);
  }
  return out;
}

/** Text a draft can hold: `useDraft` keeps strings, so lists and ids travel as JSON. */
export function fieldsToDraft(fields: ErratumFieldsInput, tags: readonly string[] | null): Record<string, string> {
  const out: Record<string, string> = {};
  for (const field of Object.keys(erratumFieldLabels) as ErratumFieldName[]) {
    const value = (fields as Record<string, unknown>)[field];
    out[field] = typeof value === 'string' ? value : JSON.stringify(value ?? null);
  }
  if (tags) out.tags = JSON.stringify(tags);
  return out;
}

export function fieldsFromDraft(content: Record<string, string>): {
  fields: Required<ErratumFieldsInput>;
  tags: string[] | null;
} {
  const parsed: Record<string, unknown> = {};
  for (const [field, raw] of Object.entries(content)) {
    if (['affected', 'fixedIn', 'refdes', 'parts', 'pins', 'tags'].includes(field)) {
      try {
        parsed[field] = JSON.parse(raw);
      } catch {
        // A damaged entry falls back to the blank value.
      }
    } else parsed[field] = raw;
  }
  return { fields: fieldsOfStored(parsed), tags: Array.isArray(parsed.tags) ? list(parsed.tags) : null };
}
