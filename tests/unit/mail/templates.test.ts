/**
 * The notification e-mails. Expected sentences are written out by hand from the wording we
 * chose (the product brief's own example: "Bram Tolliver proposed an erratum on Greenhouse
 * vent controller"); HTML is checked by parsing it with htmlparser2, never by pattern.
 */
import { Parser } from 'htmlparser2';
import { describe, expect, it } from 'vitest';
import {
  appLink,
  DIGEST_MAX_ITEMS,
  describeNotification,
  renderDigestEmail,
  renderNotificationEmail,
  type DigestItem,
} from '../../../api/mail/templates';
import type { NotificationPayload } from '../../../shared/contracts/errata';

const ORIGIN = 'https://reworkbook.example';
const links = {
  open: `${ORIGIN}/projects/greenhouse-vent/errata/E4`,
  unsubscribe: `${ORIGIN}/unsubscribe?token=abc`,
  settings: `${ORIGIN}/me/settings/notifications`,
};
const ilse = { displayName: 'Ilse Marrow', handle: 'ilse-marrow' };

const payload = (over: Partial<NotificationPayload> = {}): NotificationPayload => ({
  projectSlug: 'greenhouse-vent',
  projectTitle: 'Greenhouse vent controller',
  actor: { handle: 'bram-tolliver', displayName: 'Bram Tolliver' },
  path: '/projects/greenhouse-vent/proposals/7',
  ...over,
});

interface Parsed {
  elements: { name: string; attribs: Record<string, string> }[];
  text: string;
}

function parse(html: string): Parsed {
  const parsed: Parsed = { elements: [], text: '' };
  const parser = new Parser(
    {
      onopentag: (name, attribs) => parsed.elements.push({ name, attribs }),
      ontext: (text) => (parsed.text += text),
    },
    { decodeEntities: true, lowerCaseTags: true, lowerCaseAttributeNames: true },
  );
  parser.write(html);
  parser.end();
  return parsed;
}

const hrefs = (html: string) =>
  parse(html)
    .elements.filter((e) => e.name === 'a')
    .map((e) => e.attribs.href);

describe('the sentence of each notification', () => {
  it.each([
    [
      'proposal_received',
      payload({ proposalKind: 'new_erratum' }),
      'Bram Tolliver proposed an erratum on Greenhouse vent controller',
    ],
    [
      'proposal_received',
      payload({ proposalKind: 'erratum_edit', targetLabel: 'E3 Relay never switches' }),
      'Bram Tolliver proposed an edit to “E3 Relay never switches” on Greenhouse vent controller',
    ],
    [
      'proposal_received',
      payload({ proposalKind: 'document_edit', targetLabel: 'Hardware' }),
      'Bram Tolliver proposed an edit to “Hardware” on Greenhouse vent controller',
    ],
    [
      'proposal_decided',
      payload({
        actor: { handle: 'ilse-marrow', displayName: 'Ilse Marrow' },
        decision: 'accepted',
        targetLabel: 'E3 Relay never switches',
      }),
      'Ilse Marrow accepted your proposal “E3 Relay never switches” on Greenhouse vent controller',
    ],
    [
      'proposal_decided',
      payload({ actor: { handle: 'ilse-marrow', displayName: 'Ilse Marrow' }, decision: 'declined' }),
      'Ilse Marrow declined your proposal on Greenhouse vent controller',
    ],
    [
      'comment',
      payload({ targetLabel: 'E2 Brown-out when the fan starts' }),
      'Bram Tolliver commented on “E2 Brown-out when the fan starts” in Greenhouse vent controller',
    ],
    [
      'new_erratum',
      payload({
        actor: { handle: 'ilse-marrow', displayName: 'Ilse Marrow' },
        erratumNumber: 4,
        erratumTitle: 'Relay chatters at dusk',
      }),
      'Ilse Marrow recorded erratum E4 “Relay chatters at dusk” on Greenhouse vent controller',
    ],
  ] as const)('%s: %s', (kind, p, expected) => {
    expect(describeNotification(kind, p)).toBe(expected);
    expect(renderNotificationEmail(kind, p, ilse, links).subject).toBe(expected);
  });

  it('falls back to the handle when a display name is blank', () => {
    const p = payload({ proposalKind: 'new_erratum', actor: { handle: 'bram-tolliver', displayName: '  ' } });
    expect(describeNotification('proposal_received', p)).toBe(
      '@bram-tolliver proposed an erratum on Greenhouse vent controller',
    );
  });
});

describe('a notification e-mail', () => {
  const mail = renderNotificationEmail(
    'proposal_decided',
    payload({ decision: 'declined', reason: 'The fix is already in Rev B.' }),
    ilse,
    links,
  );

  it('greets the member, says what happened, and carries the decline reason in both parts', () => {
    expect(mail.text).toContain('Hello Ilse Marrow,');
    expect(mail.text).toContain('Bram Tolliver declined your proposal on Greenhouse vent controller.');
    expect(mail.text).toContain('> The fix is already in Rev B.');
    expect(parse(mail.html).text).toContain('The fix is already in Rev B.');
  });

  it('links the item, the unsubscribe page and the settings in the text and the HTML part', () => {
    expect(mail.text).toContain(`Open it: ${links.open}`);
    expect(mail.text).toContain(`Stop these e-mails: ${links.unsubscribe}`);
    expect(mail.text).toContain(`All notification settings: ${links.settings}`);
    expect(hrefs(mail.html)).toEqual([links.open, links.unsubscribe, links.settings]);
  });

  it('says why it was sent, in the words of the settings page', () => {
    expect(mail.text).toContain('send one when your proposal is accepted or declined.');
  });

  it('escapes hostile member text in the HTML part and keeps it out of header lines', () => {
    const hostile = payload({
      actor: { handle: 'mallory', displayName: '<script>alert(1)</script>' },
      projectTitle: '"><img src=x onerror=alert(2)>',
      targetLabel: "Hardware' onmouseover='alert(3)",
      excerpt: '<iframe src="https://evil.invalid"></iframe>\nSecond line\r\nBcc: someone@evil.invalid',
    });
    const hostileMail = renderNotificationEmail(
      'comment',
      hostile,
      { displayName: '<b>Ilse</b>', handle: 'ilse-marrow' },
      links,
    );
    const parsed = parse(hostileMail.html);
    const names = new Set(parsed.elements.map((e) => e.name));
    for (const forbidden of ['script', 'img', 'iframe', 'b']) expect(names.has(forbidden), forbidden).toBe(false);
    for (const element of parsed.elements) {
      expect(
        Object.keys(element.attribs).filter((a) => a.startsWith('on')),
        element.name,
      ).toEqual([]);
    }
    // The words are all there, as text.
    expect(parsed.text).toContain(
      "<script>alert(1)</script> commented on “Hardware' onmouseover='alert(3)” in \"><img src=x onerror=alert(2)>",
    );
    expect(parsed.text).toContain('<iframe src="https://evil.invalid"></iframe>');
    expect(hostileMail.subject).not.toMatch(/[\r\n]/);
  });
});

describe('links in e-mails', () => {
  it('keeps app paths on our origin and turns anything else into the home page', () => {
    expect(appLink(ORIGIN, '/projects/greenhouse-vent/errata/E4')).toBe(`${ORIGIN}/projects/greenhouse-vent/errata/E4`);
    expect(appLink(ORIGIN, '/projects/a?tab=errata#E4')).toBe(`${ORIGIN}/projects/a?tab=errata#E4`);
    for (const away of [
      '//evil.invalid/x',
      'https://evil.invalid/',
      'javascript:alert(1)',
      '/\\evil.invalid',
      'projects/a',
    ]) {
      expect(appLink(ORIGIN, away), away).toBe(`${ORIGIN}/`);
    }
  });
});

describe('the daily digest', () => {
  const item = (slug: string, title: string, n: number): DigestItem => ({
    kind: 'new_erratum',
    payload: payload({
      projectSlug: slug,
      projectTitle: title,
      actor: { handle: 'ilse-marrow', displayName: 'Ilse Marrow' },
      erratumNumber: n,
      erratumTitle: `Defect ${n}`,
      path: `/projects/${slug}/errata/E${n}`,
    }),
    open: `${ORIGIN}/projects/${slug}/errata/E${n}`,
  });
  const digestLinks = {
    unsubscribe: `${ORIGIN}/unsubscribe?token=d`,
    settings: links.settings,
    all: `${ORIGIN}/me/notifications`,
  };

  it('lists every item once, under its project', () => {
    const mail = renderDigestEmail(
      [
        item('greenhouse-vent', 'Greenhouse vent controller', 4),
        item('tide-clock', 'Tide clock', 1),
        item('greenhouse-vent', 'Greenhouse vent controller', 5),
      ],
      { displayName: 'Bram Tolliver', handle: 'bram-tolliver' },
      digestLinks,
    );
    expect(mail.subject).toBe('Your Reworkbook digest: 3 updates on 2 projects');
    expect(mail.text).toContain(
      [
        'Greenhouse vent controller',
        '  - Ilse Marrow recorded erratum E4 “Defect 4”',
        `    ${ORIGIN}/projects/greenhouse-vent/errata/E4`,
        '  - Ilse Marrow recorded erratum E5 “Defect 5”',
        `    ${ORIGIN}/projects/greenhouse-vent/errata/E5`,
        '',
        'Tide clock',
        '  - Ilse Marrow recorded erratum E1 “Defect 1”',
      ].join('\n'),
    );
    const parsed = parse(mail.html);
    expect(parsed.elements.filter((e) => e.name === 'h2')).toHaveLength(2);
    expect(parsed.elements.filter((e) => e.name === 'li')).toHaveLength(3);
    expect(hrefs(mail.html)).toContain(digestLinks.unsubscribe);
  });

  it('says "1 update on 1 project" for a single item', () => {
    expect(renderDigestEmail([item('tide-clock', 'Tide clock', 1)], ilse, digestLinks).subject).toBe(
      'Your Reworkbook digest: 1 update on 1 project',
    );
  });

  it(`lists at most ${DIGEST_MAX_ITEMS} items and links the rest`, () => {
    const many = Array.from({ length: DIGEST_MAX_ITEMS + 5 }, (_, i) => item('tide-clock', 'Tide clock', i + 1));
    const mail = renderDigestEmail(many, ilse, digestLinks);
    expect(parse(mail.html).elements.filter((e) => e.name === 'li')).toHaveLength(DIGEST_MAX_ITEMS);
    expect(mail.text).toContain(`…and 5 more updates: ${digestLinks.all}`);
    expect(mail.subject).toBe(`Your Reworkbook digest: ${DIGEST_MAX_ITEMS + 5} updates on 1 project`);
  });
});
