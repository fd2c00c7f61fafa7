import { describe, expect, it } from 'vitest';
import { handleSchema, isAppRelativePath, line, prose, slugify } from '../../../shared/text';

describe('isAppRelativePath (post-sign-in redirects)', () => {
  it.each(['/', '/admin/users', '/projects/greenhouse-vent-controller?tab=errata#e3'])('accepts %s', (path) => {
    expect(isAppRelativePath(path)).toBe(true);
  });
  it.each([
    'https://attacker.example/',
    '//attacker.example',
    '/\\attacker.example',
    '\\\\attacker.example',
    'javascript:alert(1)',
    ' /leading-space',
    '/line\nbreak',
    '',
    'relative/path',
  ])('refuses %j', (path) => {
    expect(isAppRelativePath(path)).toBe(false);
  });
});

describe('text contracts', () => {
  it('refuse NUL, other control characters and lone surrogates', () => {
    const title = line({ max: 100, label: 'Title' });
    expect(title.safeParse('Relay\u0000').success).toBe(false);
    expect(title.safeParse('Relay\u0007').success).toBe(false);
    expect(title.safeParse('Relay \ud800').success).toBe(false);
    expect(title.safeParse('Relay 🔌 drive').success).toBe(true);
  });

  it('keep prose as written, with line breaks and tabs', () => {
    const body = prose({ max: 1000 });
    expect(body.parse('  a\n\tb\r\n')).toBe('  a\n\tb\r\n');
  });

  it('count the limit in characters and say it in the message', () => {
    const result = line({ max: 5, label: 'Label' }).safeParse('123456');
    expect(result.success).toBe(false);
    expect(result.error?.issues[0]?.message).toBe('Label is at most 5 characters');
  });

  it('accept handles the provider allows and refuse the rest', () => {
    expect(handleSchema.safeParse('ilse-marrow').success).toBe(true);
    expect(handleSchema.safeParse('-ilse').success).toBe(false);
    expect(handleSchema.safeParse('ilse--marrow').success).toBe(false);
    expect(handleSchema.safeParse('a'.repeat(40)).success).toBe(false);
  });

  it('slugify titles to lowercase words joined by hyphens', () => {
    expect(slugify('Greenhouse Vent Controller — Rev B!')).toBe('greenhouse-vent-controller-rev-b');
    expect(slugify('Ünïcode  näme')).toBe('unicode-name');
  });
});
