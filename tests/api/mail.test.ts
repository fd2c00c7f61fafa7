/**
 * E-mail delivery end to end: a notification row, a job in pg-boss, a worker, nodemailer, the
 * local mail capture, then mailparser reading what arrived. Most tests insert notifications and
 * enqueue them the way the notification service does after its commit (`jobs.send` with the
 * notification id as singleton key); one goes through a real proposal.
 */
import { Parser } from 'htmlparser2';
import { simpleParser, type ParsedMail } from 'mailparser';
import { and, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runDailyDigest } from '../../api/jobs/daily-digest';
import { enqueuePendingNotificationEmails } from '../../api/jobs/notification-email';
import { createUnsubscribeToken } from '../../api/mail/unsubscribe';
import type { CapturedMessage } from '../../api/fakes/smtp';
import { notifications, notificationSettings, users } from '../../db/schema';
import type { NotificationKind, NotificationPayload } from '../../shared/contracts/errata';
import { createTestApp, TEST_ORIGIN, type TestApp } from '../setup/app';

async function waitFor<T>(
  what: string,
  probe: () => Promise<T | undefined> | T | undefined,
  timeoutMs = 20_000,
): Promise<T> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const value = await probe();
    if (value !== undefined) return value;
    if (Date.now() > until) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

async function userOf(t: TestApp, handle: string) {
  const [row] = await t.ctx.db.select().from(users).where(eq(users.handle, handle));
  return row!;
}

const payload = (over: Partial<NotificationPayload> = {}): NotificationPayload => ({
  projectSlug: 'greenhouse-vent-controller',
  projectTitle: 'Greenhouse vent controller',
  actor: { handle: 'bram-tolliver', displayName: 'Bram Tolliver' },
  proposalKind: 'new_erratum',
  proposalId: 7,
  path: '/proposals/7',
  ...over,
});

async function insertNotification(
  t: TestApp,
  userId: number,
  kind: NotificationKind,
  p: NotificationPayload,
  createdAt?: Date,
) {
  const [row] = await t.ctx.db
    .insert(notifications)
    .values({ userId, kind, payload: p, ...(createdAt ? { createdAt } : {}) })
    .returning({ id: notifications.id });
  return row!.id;
}

const enqueue = (t: TestApp, id: number) =>
  t.ctx.jobs.send('notification-email', { notificationId: id }, { singletonKey: `notification-${id}` });

async function jobState(t: TestApp, jobId: string) {
  const { rows } = await t.ctx.database.pool.query<{ state: string; output: { outcome?: string } | null }>(
    'SELECT state, output FROM pgboss.job WHERE id = $1',
    [jobId],
  );
  return rows[0];
}

const emailed = async (t: TestApp, id: number) =>
  (await t.ctx.db.select({ emailed: notifications.emailed }).from(notifications).where(eq(notifications.id, id)))[0]!
    .emailed;

const arrivedFor = (t: TestApp, address: string, subject: string) => (): CapturedMessage | undefined =>
  t.outbox.messages().find((m) => m.envelope.to.includes(address) && m.subject === subject);

/** A header field as it stands in the message, unfolded (mailparser restructures the List-* fields). */
function header(mail: ParsedMail, name: string): string | undefined {
  const line = mail.headerLines.find((h) => h.key === name.toLowerCase())?.line.replace(/\r?\n[ \t]+/g, ' ');
  return line?.slice(line.indexOf(':') + 1).trim();
}

/** The first URI in angle brackets of a List-Unsubscribe value (RFC 2369 §2). */
function unsubscribeUrl(mail: ParsedMail): URL {
  const value = header(mail, 'List-Unsubscribe') ?? '';
  const match = /^<(https?:\/\/[^>]+)>$/.exec(value);
  expect(match, value).not.toBeNull();
  return new URL(match![1]!);
}

const settingsOf = (t: TestApp, userId: number) =>
  t.ctx.db
    .select({ kind: notificationSettings.kind, mode: notificationSettings.mode })
    .from(notificationSettings)
    .where(eq(notificationSettings.userId, userId))
    .orderBy(notificationSettings.kind);

describe('notification e-mails', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await createTestApp({ workers: true });
  });
  afterAll(async () => {
    await t.close();
  });

  // RFC 5322 §3.6 (From, Date required; Message-ID should be present), RFC 2046 §5.1.4
  // (multipart/alternative: plain text first, then HTML), RFC 2369 §3.2 (List-Unsubscribe:
  // a URI in angle brackets) and RFC 8058 §3.1 (an HTTPS URI and List-Unsubscribe-Post with
  // exactly "List-Unsubscribe=One-Click"; http is what a development origin has).
  it('delivers a valid message: From, To, Subject, Date, Message-ID, text and HTML parts, one-click unsubscribe', async () => {
    const ilse = await userOf(t, 'ilse-marrow');
    const id = await insertNotification(t, ilse.id, 'proposal_received', payload());
    expect(await enqueue(t, id)).not.toBeNull();
    const subject = 'Bram Tolliver proposed an erratum on Greenhouse vent controller';
    const captured = await waitFor('the proposal e-mail', arrivedFor(t, ilse.email!, subject));
    const mail = await simpleParser(captured.raw);

    expect(mail.from?.value).toEqual([{ name: 'Reworkbook', address: 'notifications@reworkbook.invalid' }]);
    expect((Array.isArray(mail.to) ? mail.to : [mail.to!]).flatMap((a) => a.value.map((v) => v.address))).toEqual([
      ilse.email,
    ]);
    expect(mail.subject).toBe(subject);
    expect(mail.date).toBeInstanceOf(Date);
    expect(Math.abs(mail.date!.getTime() - Date.now())).toBeLessThan(60_000);
    expect(mail.messageId).toMatch(/^<[^<>@\s]+@[^<>@\s]+>$/);
    expect((mail.headers.get('content-type') as { value: string }).value).toBe('multipart/alternative');
    const plainAt = captured.raw.search(/^Content-Type: text\/plain/im);
    expect(plainAt).toBeGreaterThan(0);
    expect(captured.raw.search(/^Content-Type: text\/html/im)).toBeGreaterThan(plainAt);
    expect(mail.text).toContain(`${TEST_ORIGIN}/proposals/7`);
    expect(mail.html).toContain(`href="${TEST_ORIGIN}/proposals/7"`);

    const oneClick = unsubscribeUrl(mail);
    expect(oneClick.origin + oneClick.pathname).toBe(`${TEST_ORIGIN}/api/unsubscribe`);
    expect(header(mail, 'List-Unsubscribe-Post')).toBe('List-Unsubscribe=One-Click');
    // The visible link goes to the explaining page, with the same token.
    expect(mail.text).toContain(
      `Stop these e-mails: ${TEST_ORIGIN}/unsubscribe?token=${oneClick.searchParams.get('token')}`,
    );
    expect(await emailed(t, id)).toBe(true);
  });

  it('unsubscribes with the one POST a mail client sends; a GET of the link changes nothing; later ones are not e-mailed', async () => {
    const juniper = await userOf(t, 'juniper-okoye');
    const first = await insertNotification(
      t,
      juniper.id,
      'comment',
      payload({ targetLabel: 'E2 Fan stalls on cold mornings', excerpt: 'Same here.' }),
    );
    await enqueue(t, first);
    const subject = 'Bram Tolliver commented on “E2 Fan stalls on cold mornings” in Greenhouse vent controller';
    const mail = await simpleParser((await waitFor('the comment e-mail', arrivedFor(t, juniper.email!, subject))).raw);
    const link = unsubscribeUrl(mail);

    // Link scanners fetch what they find: GET only describes.
    const looked = await t
      .agent()
      .get(link.pathname + link.search)
      .expect(200);
    expect(looked.body).toEqual({ kind: 'comment', mode: 'immediate' });
    expect(await settingsOf(t, juniper.id)).toEqual([]);

    // What a mail client sends for RFC 8058 one-click: a form POST, no cookie, no Origin, no CSRF token.
    const posted = await t
      .agent()
      .post(link.pathname + link.search)
      .type('form')
      .send('List-Unsubscribe=One-Click')
      .expect(200);
    expect(posted.body).toEqual({ kind: 'comment', mode: 'off' });
    expect(await settingsOf(t, juniper.id)).toEqual([{ kind: 'comment', mode: 'off' }]);

    const later = await insertNotification(
      t,
      juniper.id,
      'comment',
      payload({ targetLabel: 'E2 Fan stalls on cold mornings', excerpt: 'Fixed?' }),
    );
    const jobId = (await enqueue(t, later))!;
    const done = await waitFor('the job to finish', async () => {
      const job = await jobState(t, jobId);
      return job?.state === 'completed' ? job : undefined;
    });
    expect(done.output?.outcome).toBe('not-immediate');
    expect(t.outbox.messages().filter((m) => m.envelope.to.includes(juniper.email!))).toHaveLength(1);
    expect(await emailed(t, later)).toBe(false);
  });

  it('sends a notification once even when it is enqueued again after delivery', async () => {
    const ilse = await userOf(t, 'ilse-marrow');
    const id = await insertNotification(
      t,
      ilse.id,
      'proposal_received',
      payload({ proposalKind: 'document_edit', targetLabel: 'Firmware' }),
    );
    const subject = 'Bram Tolliver proposed an edit to “Firmware” on Greenhouse vent controller';
    await enqueue(t, id);
    await waitFor('the first delivery', arrivedFor(t, ilse.email!, subject));
    const again = (await enqueue(t, id))!;
    const done = await waitFor('the second job', async () => {
      const job = await jobState(t, again);
      return job?.state === 'completed' ? job : undefined;
    });
    expect(done.output?.outcome).toBe('already-emailed');
    expect(t.outbox.messages().filter((m) => m.subject === subject)).toHaveLength(1);
  });

  it('recovers immediate notifications whose enqueue was lost, two minutes after they were written', async () => {
    const odile = await userOf(t, 'odile-fenwick');
    const ago = (ms: number) => new Date(Date.now() - ms);
    const lost = await insertNotification(
      t,
      odile.id,
      'proposal_received',
      payload({ projectTitle: 'Lost and found' }),
      ago(5 * 60_000),
    );
    const fresh = await insertNotification(
      t,
      odile.id,
      'proposal_received',
      payload({ projectTitle: 'Still fresh' }),
      ago(30_000),
    );
    const stale = await insertNotification(
      t,
      odile.id,
      'proposal_received',
      payload({ projectTitle: 'Long ago' }),
      ago(3 * 24 * 60 * 60_000),
    );
    const daily = await insertNotification(
      t,
      odile.id,
      'new_erratum',
      payload({ projectTitle: 'Digest only' }),
      ago(5 * 60_000),
    );

    expect(await enqueuePendingNotificationEmails(t.ctx)).toBe(1);
    await waitFor(
      'the recovered e-mail',
      arrivedFor(t, odile.email!, 'Bram Tolliver proposed an erratum on Lost and found'),
    );
    await waitFor('the row to be marked', async () => ((await emailed(t, lost)) ? true : undefined));
    for (const id of [fresh, stale, daily]) expect(await emailed(t, id)).toBe(false);
    expect(await enqueuePendingNotificationEmails(t.ctx)).toBe(0);
  });

  it('escapes hostile payload text in the HTML part', async () => {
    const bram = await userOf(t, 'bram-tolliver');
    const id = await insertNotification(
      t,
      bram.id,
      'comment',
      payload({
        actor: { handle: 'juniper-okoye', displayName: '<script>alert(1)</script>' },
        targetLabel: '"><img src=x onerror=alert(2)>',
        excerpt: '<a href="javascript:alert(3)">click</a>',
      }),
    );
    await enqueue(t, id);
    const captured = await waitFor('the hostile e-mail', () =>
      t.outbox.messages().find((m) => m.envelope.to.includes(bram.email!) && m.subject.startsWith('<script>')),
    );
    const html = (await simpleParser(captured.raw)).html as string;
    const tags: string[] = [];
    const hrefs: string[] = [];
    const parser = new Parser({
      onopentag(name, attribs) {
        tags.push(name);
        if (attribs.href !== undefined) hrefs.push(attribs.href);
        for (const attribute of Object.keys(attribs))
          expect(attribute.startsWith('on'), `${name} ${attribute}`).toBe(false);
      },
    });
    parser.write(html);
    parser.end();
    expect(tags).not.toContain('script');
    expect(tags).not.toContain('img');
    expect(hrefs.every((h) => h.startsWith(`${TEST_ORIGIN}/`))).toBe(true);
    expect(html).toContain('&lt;script&gt;alert(1)&lt;/script&gt;');
    expect(html).toContain('&quot;&gt;&lt;img src=x onerror=alert(2)&gt;');
    expect(html).toContain('&lt;a href=&quot;javascript:alert(3)&quot;&gt;click&lt;/a&gt;');
  });

  it('delays mail while the SMTP server is down, without losing it or slowing the enqueue', async () => {
    const bram = await userOf(t, 'bram-tolliver');
    await t.outbox.close();
    const id = await insertNotification(
      t,
      bram.id,
      'proposal_received',
      payload({ projectTitle: 'Tide clock', projectSlug: 'tide-clock' }),
    );
    const started = performance.now();
    const jobId = await enqueue(t, id);
    expect(performance.now() - started).toBeLessThan(1_000);
    expect(jobId).not.toBeNull();

    // The first attempt fails and the job waits for its retry; nothing is marked sent.
    await waitFor('a failed attempt', async () => ((await jobState(t, jobId!))?.state === 'retry' ? true : undefined));
    const subject = 'Bram Tolliver proposed an erratum on Tide clock';
    expect(arrivedFor(t, bram.email!, subject)()).toBeUndefined();
    expect(await emailed(t, id)).toBe(false);

    await t.outbox.restart();
    await waitFor('the delayed e-mail', arrivedFor(t, bram.email!, subject), 30_000);
    await waitFor('the row to be marked', async () => ((await emailed(t, id)) ? true : undefined));
    expect(t.outbox.messages().filter((m) => m.subject === subject)).toHaveLength(1);
  }, 60_000);

  it("answers a proposal at once while the mail server is down; the owners' e-mails follow when it is back", async () => {
    const bram = await t.signIn('bram-tolliver');
    const project = (await t.agent().get('/api/projects/greenhouse-vent-controller').expect(200)).body as {
      title: string;
    };
    const subject = `Bram Tolliver proposed an erratum on ${project.title}`;
    const owners = [await userOf(t, 'ilse-marrow'), await userOf(t, 'juniper-okoye')];
    const countFor = (email: string) =>
      t.outbox.messages().filter((m) => m.subject === subject && m.envelope.to.includes(email)).length;
    const before = owners.map((u) => countFor(u.email!));

    await t.outbox.close();
    const started = performance.now();
    const res = await bram.agent
      .post('/api/projects/greenhouse-vent-controller/proposals')
      .set(bram.headers)
      .send({
        kind: 'new_erratum',
        message: 'Seen on my board too',
        payload: {
          title: 'Vent motor stalls below 5 °C',
          category: 'power',
          severity: 'minor',
          status: 'open',
          affected: [],
        },
      });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(performance.now() - started).toBeLessThan(2_000);
    await new Promise((r) => setTimeout(r, 1_000));
    expect(owners.map((u) => countFor(u.email!))).toEqual(before);

    await t.outbox.restart();
    await waitFor(
      "both owners' e-mails",
      () => (owners.every((u, i) => countFor(u.email!) === before[i]! + 1) ? true : undefined),
      30_000,
    );
  }, 60_000);

  it('lists captured messages on the development outbox routes', async () => {
    const list = await t.agent().get('/api/dev/outbox').expect(200);
    expect(list.body.items.length).toBe(t.outbox.messages().length);
    const newest = t.outbox.messages()[0]!;
    expect(list.body.items[0]).toEqual({
      id: newest.id,
      to: newest.to,
      subject: newest.subject,
      receivedAt: newest.receivedAt.toISOString(),
    });
    const one = await t.agent().get(`/api/dev/outbox/${newest.id}`).expect(200);
    expect(one.body.text).toBe(newest.text);
    expect(one.body.html).toBe(newest.html);
    expect(one.body.headers).toContainEqual({ name: 'List-Unsubscribe-Post', value: 'List-Unsubscribe=One-Click' });
    await t.agent().get('/api/dev/outbox/20000101T000000000-00000000').expect(404);
    expect((await t.agent().get('/api/me').expect(200)).body.devOutbox).toBe(true);
  });
});

describe('the daily digest', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await createTestApp();
  });
  afterAll(async () => {
    await t.close();
  });

  it('sends each member one message listing their daily notifications by project, once', async () => {
    const bram = await userOf(t, 'bram-tolliver');
    const ilse = await userOf(t, 'ilse-marrow');
    const erratum = (slug: string, title: string, n: number, erratumTitle: string) =>
      payload({
        projectSlug: slug,
        projectTitle: title,
        actor: { handle: 'ilse-marrow', displayName: 'Ilse Marrow' },
        proposalKind: undefined,
        proposalId: undefined,
        erratumNumber: n,
        erratumTitle,
        path: `/projects/${slug}/errata/E${n}`,
      });
    // new_erratum is daily by default; comment is immediate by default.
    const daily = [
      await insertNotification(
        t,
        bram.id,
        'new_erratum',
        erratum('greenhouse-vent-controller', 'Greenhouse vent controller', 4, 'Relay chatters at dusk'),
      ),
      await insertNotification(
        t,
        bram.id,
        'new_erratum',
        erratum('tide-clock', 'Tide clock', 2, 'Hands drift in the cold'),
      ),
      await insertNotification(
        t,
        bram.id,
        'new_erratum',
        erratum('greenhouse-vent-controller', 'Greenhouse vent controller', 5, 'Fuse too small'),
      ),
    ];
    const immediate = await insertNotification(
      t,
      bram.id,
      'comment',
      payload({ targetLabel: 'E4 Relay chatters at dusk' }),
    );
    const tooLate = await insertNotification(
      t,
      bram.id,
      'new_erratum',
      erratum('tide-clock', 'Tide clock', 3, 'Not yet'),
      new Date(Date.now() + 60 * 60_000),
    );
    // Ilse chose the digest for comments.
    await t.ctx.db.insert(notificationSettings).values({ userId: ilse.id, kind: 'comment', mode: 'daily' });
    const ilseComment = await insertNotification(t, ilse.id, 'comment', payload({ targetLabel: 'Hardware' }));
    // A second on: the database stamps microseconds, a JavaScript date only milliseconds, so a row
    // written in the same millisecond would otherwise count as later than "now".
    const now = new Date(Date.now() + 1_000);

    expect(await runDailyDigest(t.ctx, now)).toEqual({ sent: 2, notifications: 4, failed: 0 });

    const toBram = t.outbox.messages().filter((m) => m.envelope.to.includes(bram.email!));
    expect(toBram).toHaveLength(1);
    const mail = await simpleParser(toBram[0]!.raw);
    expect(mail.subject).toBe('Your Reworkbook digest: 3 updates on 2 projects');
    expect(mail.text).toContain(
      [
        'Greenhouse vent controller',
        '  - Ilse Marrow recorded erratum E4 “Relay chatters at dusk”',
        `    ${TEST_ORIGIN}/projects/greenhouse-vent-controller/errata/E4`,
        '  - Ilse Marrow recorded erratum E5 “Fuse too small”',
        `    ${TEST_ORIGIN}/projects/greenhouse-vent-controller/errata/E5`,
        '',
        'Tide clock',
        '  - Ilse Marrow recorded erratum E2 “Hands drift in the cold”',
        `    ${TEST_ORIGIN}/projects/tide-clock/errata/E2`,
      ].join('\n'),
    );
    expect(mail.text).not.toContain('Not yet');
    expect(mail.text).not.toContain('commented');
    expect(header(mail, 'List-Unsubscribe-Post')).toBe('List-Unsubscribe=One-Click');
    const toIlse = t.outbox.messages().filter((m) => m.envelope.to.includes(ilse.email!));
    expect(toIlse.map((m) => m.subject)).toEqual(['Your Reworkbook digest: 1 update on 1 project']);

    for (const id of [...daily, ilseComment]) expect(await emailed(t, id), `notification ${id}`).toBe(true);
    expect(await emailed(t, immediate)).toBe(false);
    expect(await emailed(t, tooLate)).toBe(false);

    const count = t.outbox.messages().length;
    expect(await runDailyDigest(t.ctx, now)).toEqual({ sent: 0, notifications: 0, failed: 0 });
    expect(t.outbox.messages()).toHaveLength(count);

    // Its one-click link turns off every kind that was in the digest, and nothing else.
    const link = unsubscribeUrl(mail);
    const posted = await t
      .agent()
      .post(link.pathname + link.search)
      .type('form')
      .send('List-Unsubscribe=One-Click')
      .expect(200);
    expect(posted.body).toEqual({ kind: 'daily_digest', mode: 'off' });
    expect(await settingsOf(t, bram.id)).toEqual([{ kind: 'new_erratum', mode: 'off' }]);
  });
});

describe('unsubscribe links that are not ours', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await createTestApp();
  });
  afterAll(async () => {
    await t.close();
  });

  it('are refused with 400 and change nothing', async () => {
    const bram = await userOf(t, 'bram-tolliver');
    const good = createUnsubscribeToken(t.config.sessionSecret, bram.id, 'comment');
    const last = good.at(-1) === 'A' ? 'B' : 'A';
    const bad = {
      garbage: 'not-a-token-at-all-but-long-enough-to-look-like-one-xxxxxxxxx',
      tampered: `${good.slice(0, -1)}${last}`,
      'signed with another secret': createUnsubscribeToken(
        'some-other-secret-of-at-least-32-characters',
        bram.id,
        'comment',
      ),
      'for a member who does not exist': createUnsubscribeToken(t.config.sessionSecret, 999_999, 'comment'),
    };
    for (const [what, token] of Object.entries(bad)) {
      for (const method of ['get', 'post'] as const) {
        const url = `/api/unsubscribe?token=${encodeURIComponent(token)}`;
        const agent = t.agent();
        const res = await (method === 'get'
          ? agent.get(url)
          : agent.post(url).type('form').send('List-Unsubscribe=One-Click'));
        expect(res.status, `${method} ${what}`).toBe(400);
        expect(res.body.error.code, `${method} ${what}`).toBe('bad_request');
      }
    }
    const missing = await t.agent().post('/api/unsubscribe').type('form').send('List-Unsubscribe=One-Click');
    expect(missing.status).toBe(400);
    expect(missing.body.error.code).toBe('bad_request');
    const { rows } = await t.ctx.database.pool.query<{ n: number }>(
      'SELECT count(*)::int AS n FROM notification_settings',
    );
    expect(rows[0]!.n).toBe(0);
    // The genuine token still works afterwards.
    await t.agent().post(`/api/unsubscribe?token=${good}`).expect(200);
    expect(
      await t.ctx.db
        .select({ mode: notificationSettings.mode })
        .from(notificationSettings)
        .where(and(eq(notificationSettings.userId, bram.id), eq(notificationSettings.kind, 'comment'))),
    ).toEqual([{ mode: 'off' }]);
  });
});

describe('in production', () => {
  it('has no development outbox, even with the local capture running', async () => {
    const t = await createTestApp({ seed: false, env: { NODE_ENV: 'production', SESSION_SECRET: 'p'.repeat(40) } });
    try {
      await t.agent().get('/api/dev/outbox').expect(404);
      expect((await t.agent().get('/api/me').expect(200)).body.devOutbox).toBe(false);
    } finally {
      await t.close();
    }
  });
});
