/**
 * An erratum's fields between their shapes: revisions store board ids as strings ("12") and no
 * fixed-in revision as ""; the history shows labels; drafts hold strings only.
 */
import { describe, expect, it } from 'vitest';
import {
  blankErratumFields,
  fieldsForDiff,
  fieldsFromDraft,
  fieldsOfErratum,
  fieldsOfStored,
  fieldsToDraft,
} from '@/components/errata/fields';
import { boards, errata } from './fixtures';

const names = { boards, categories: [{ slug: 'power', name: 'Power' }] };

describe('fields of a stored revision', () => {
  it('turn board ids into labels in board order, and enumerations into their words', () => {
    const shown = fieldsForDiff(
      {
        title: 'Regulator overheats',
        category: 'power',
        severity: 'critical',
        status: 'fixed_later',
        affected: ['12', '11'],
        fixedIn: '13',
        refdes: ['U3'],
        symptom: 'Shuts down.',
      },
      names,
    );
    expect(shown.affected).toEqual(['Rev A', 'Rev B']);
    expect(shown.fixedIn).toBe('Rev C');
    expect(shown.category).toBe('Power');
    expect(shown.severity).toBe('Critical — board does not work without rework');
    expect(shown.status).toBe('Fixed in a later revision');
    expect(shown.refdes).toEqual(['U3']);
  });

  it('show "no fixed-in revision" as empty and a board id the project no longer has by number', () => {
    const shown = fieldsForDiff({ affected: ['11', '99'], fixedIn: '' }, names);
    expect(shown.affected).toEqual(['Rev A', 'removed revision #99']);
    expect(shown.fixedIn).toBe('');
  });

  it('count fields a revision does not have as empty, so the first revision diffs against nothing', () => {
    const shown = fieldsForDiff(null, names);
    expect(shown.title).toBe('');
    expect(shown.pins).toEqual([]);
  });

  it('read back into the form with numbers for boards and sane values for anything broken', () => {
    const fields = fieldsOfStored({ affected: ['13', '11', 'x'], fixedIn: '12', severity: 'bogus', pins: ['PA9', 3] });
    expect(fields.affected).toEqual([11, 13]);
    expect(fields.fixedIn).toBe(12);
    expect(fields.severity).toBe('minor');
    expect(fields.pins).toEqual(['PA9']);
  });
});

describe('fields of an erratum as the API shows it', () => {
  it('carry board ids and the category slug', () => {
    const fields = fieldsOfErratum(errata[1]!);
    expect(fields.affected).toEqual([12, 11]);
    expect(fields.category).toBe('power');
    expect(fields.fixedIn).toBeNull();
  });
});

describe('drafts', () => {
  it('keep every field and the tags through the string-only draft store', () => {
    const fields = { ...fieldsOfErratum(errata[0]!), reportedByText: 'A builder on the forum' };
    const back = fieldsFromDraft(fieldsToDraft(fields, ['relay', 'input-only pin']));
    expect(back.fields).toEqual({ ...fields, affected: [11] });
    expect(back.tags).toEqual(['relay', 'input-only pin']);
  });

  it('fall back to blank values for damaged entries', () => {
    const back = fieldsFromDraft({ title: 'Kept', affected: '[1,', refdes: 'not json' });
    expect(back.fields).toEqual({ ...blankErratumFields(), title: 'Kept' });
    expect(back.tags).toBeNull();
  });
});
