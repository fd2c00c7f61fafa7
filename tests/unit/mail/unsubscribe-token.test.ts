import { describe, expect, it } from 'vitest';
import { createUnsubscribeToken, listUnsubscribeHeaders, verifyUnsubscribeToken } from '../../../api/mail/unsubscribe';

const SECRET = 'a-session-secret-of-at-least-32-characters';

describe('unsubscribe tokens', () => {
  it('name the member and the kind they were made for', () => {
    expect(verifyUnsubscribeToken(SECRET, createUnsubscribeToken(SECRET, 42, 'comment'))).toEqual({
      userId: 42,
      kind: 'comment',
    });
    expect(verifyUnsubscribeToken(SECRET, createUnsubscribeToken(SECRET, 7, 'daily_digest'))).toEqual({
      userId: 7,
      kind: 'daily_digest',
    });
  });

  it('are URL-safe as they are', () => {
    expect(createUnsubscribeToken(SECRET, 4_000_000_000, 'proposal_received')).toMatch(/^[A-Za-z0-9_-]+$/);
  });

  it('are refused under another secret', () => {
    expect(
      verifyUnsubscribeToken(
        'another-secret-of-at-least-32-characters!',
        createUnsubscribeToken(SECRET, 42, 'comment'),
      ),
    ).toBeNull();
  });

  it('are refused when any single byte changes (member, kind, version or signature)', () => {
    const bytes = Buffer.from(createUnsubscribeToken(SECRET, 42, 'comment'), 'base64url');
    for (let i = 0; i < bytes.length; i++) {
      const forged = Buffer.from(bytes);
      forged[i] = forged[i]! ^ 0x01;
      expect(verifyUnsubscribeToken(SECRET, forged.toString('base64url')), `byte ${i}`).toBeNull();
    }
  });

  it("cannot borrow another token's signature", () => {
    const mine = Buffer.from(createUnsubscribeToken(SECRET, 42, 'comment'), 'base64url');
    const theirs = Buffer.from(createUnsubscribeToken(SECRET, 43, 'comment'), 'base64url');
    const spliced = Buffer.concat([theirs.subarray(0, theirs.length - 32), mine.subarray(mine.length - 32)]);
    expect(verifyUnsubscribeToken(SECRET, spliced.toString('base64url'))).toBeNull();
  });

  it('are refused when cut short, padded or not base64url at all', () => {
    const good = createUnsubscribeToken(SECRET, 42, 'comment');
    for (const bad of [
      '',
      'abc',
      good.slice(0, -1),
      `${good}A`,
      `${good.slice(0, -2)}+/`,
      'A'.repeat(300),
      `${good}\n`,
    ]) {
      expect(verifyUnsubscribeToken(SECRET, bad), JSON.stringify(bad)).toBeNull();
    }
  });
});

describe('the List-Unsubscribe header fields', () => {
  // RFC 2369 §3.2: the field holds the URI in angle brackets. RFC 8058 §3.1: List-Unsubscribe-Post
  // holds exactly the key/value pair "List-Unsubscribe=One-Click".
  it('follow RFC 2369 and RFC 8058', () => {
    expect(listUnsubscribeHeaders('https://reworkbook.example/api/unsubscribe?token=t')).toEqual({
      'List-Unsubscribe': '<https://reworkbook.example/api/unsubscribe?token=t>',
      'List-Unsubscribe-Post': 'List-Unsubscribe=One-Click',
    });
  });
});
