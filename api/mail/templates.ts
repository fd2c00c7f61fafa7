/**
 * The notification e-mails, in plain text and in simple inline-styled HTML. Everything that
 * comes from a payload was written by a member: in HTML it is always escaped, never inserted
 * as markup, and links only ever point at our own origin.
 */
import { notificationKindLabels, type NotificationKind, type NotificationPayload } from '../../shared/contracts/errata';

export interface RenderedEmail {
  subject: string;
  text: string;
  html: string;
}

export interface Recipient {
  displayName: string;
  handle: string;
}

export interface NotificationLinks {
  /** The item itself (app origin + payload.path). */
  open: string;
  /** The unsubscribe page for this kind. */
  unsubscribe: string;
  settings: string;
}

export interface DigestItem {
  kind: NotificationKind;
  payload: NotificationPayload;
  open: string;
}

/** App-relative paths where the notification settings and the full list live. */
export const NOTIFICATION_SETTINGS_PATH = '/me/settings/notifications';
export const NOTIFICATIONS_PATH = '/me/notifications';
/** A digest lists this many items; the rest are counted and linked. */
export const DIGEST_MAX_ITEMS = 50;

export function escapeHtml(value: string): string {
  return value.replace(
    /[&<>"']/g,
    (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!,
  );
}

/** An absolute link to `path` on our origin; anything that would leave it becomes the home page. */
export function appLink(appOrigin: string, path: string): string {
  if (!path.startsWith('/') || path.startsWith('//') || path.includes('\\')) return `${appOrigin}/`;
  const url = new URL(path, appOrigin);
  return url.origin === appOrigin ? url.href : `${appOrigin}/`;
}

const collapse = (value: string) => value.replace(/\s+/g, ' ').trim();
const actorName = (p: NotificationPayload) => collapse(p.actor.displayName) || `@${p.actor.handle}`;
const quoted = (value: string) => `“${collapse(value)}”`;

/**
 * One sentence saying what happened, e.g. "Bram Tolliver proposed an erratum on Greenhouse
 * vent controller". Without the project when the digest already groups by it.
 */
export function describeNotification(kind: NotificationKind, p: NotificationPayload, withProject = true): string {
  const actor = actorName(p);
  const project = collapse(p.projectTitle);
  const on = withProject ? ` on ${project}` : '';
  const target = p.targetLabel ? collapse(p.targetLabel) : '';
  switch (kind) {
    case 'proposal_received':
      if (p.proposalKind === 'new_erratum') return `${actor} proposed an erratum${on}`;
      if (p.proposalKind === 'erratum_edit')
        return `${actor} proposed an edit to ${target ? quoted(target) : 'an erratum'}${on}`;
      if (p.proposalKind === 'document_edit')
        return `${actor} proposed an edit to ${target ? quoted(target) : 'the write-up'}${on}`;
      return `${actor} sent a proposal${on}`;
    case 'proposal_decided': {
      const what = target ? `your proposal ${quoted(target)}` : 'your proposal';
      if (p.decision === 'accepted') return `${actor} accepted ${what}${on}`;
      if (p.decision === 'declined') return `${actor} declined ${what}${on}`;
      return `${actor} decided on ${what}${on}`;
    }
    case 'comment':
      return target
        ? `${actor} commented on ${quoted(target)}${withProject ? ` in ${project}` : ''}`
        : `${actor} commented in a discussion${on}`;
    case 'new_erratum': {
      const code = p.erratumNumber ? `erratum E${p.erratumNumber}` : 'an erratum';
      const title = p.erratumTitle ? ` ${quoted(p.erratumTitle)}` : '';
      return `${actor} recorded ${code}${title}${on}`;
    }
  }
}

/** A further line or two under the sentence: the decline reason or the comment's opening. */
function detailOf(kind: NotificationKind, p: NotificationPayload): { label: string; body: string } | null {
  if (kind === 'proposal_decided' && p.decision === 'declined' && p.reason?.trim())
    return { label: 'Reason', body: p.reason.trim() };
  if (p.excerpt?.trim()) return { label: kind === 'comment' ? 'They wrote' : 'Message', body: p.excerpt.trim() };
  return null;
}

const reasonLine = (kind: NotificationKind) => {
  const label = notificationKindLabels[kind];
  return `${label[0]!.toLowerCase()}${label.slice(1)}`;
};

const greeting = (r: Recipient) => `Hello ${collapse(r.displayName) || `@${r.handle}`},`;

// --- HTML scaffolding: inline styles only (mail clients drop <style> and classes) -------------

const colors = {
  paper: '#f6f4ef',
  surface: '#ffffff',
  ink: '#1f2421',
  muted: '#55524b',
  rule: '#e7e3da',
  primary: '#1f5f5b',
};
const font = "-apple-system, 'Segoe UI', Roboto, 'Helvetica Neue', Arial, sans-serif";

function page(subject: string, inner: string, footer: string): string {
  return [
    '<!doctype html>',
    '<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">',
    `<title>${escapeHtml(subject)}</title></head>`,
    `<body style="margin:0;padding:16px;background:${colors.paper};font-family:${font};color:${colors.ink};font-size:15px;line-height:1.5">`,
    `<div style="max-width:560px;margin:0 auto;background:${colors.surface};border:1px solid ${colors.rule};border-radius:8px;padding:24px">`,
    inner,
    `<hr style="border:none;border-top:1px solid ${colors.rule};margin:24px 0 12px">`,
    `<p style="margin:0;font-size:13px;color:${colors.muted}">${footer}</p>`,
    '</div></body></html>',
  ].join('\n');
}

const link = (href: string, label: string) =>
  `<a href="${escapeHtml(href)}" style="color:${colors.primary}">${escapeHtml(label)}</a>`;
const button = (href: string, label: string) =>
  `<p style="margin:20px 0 0"><a href="${escapeHtml(href)}" style="display:inline-block;padding:10px 18px;background:${colors.primary};color:#ffffff;text-decoration:none;border-radius:6px;font-weight:600">${escapeHtml(label)}</a></p>`;
const paragraphs = (text: string) => escapeHtml(text).replace(/\r?\n/g, '<br>');

function quoteText(text: string): string {
  return text
    .split(/\r?\n/)
    .map((line) => `> ${line}`.trimEnd())
    .join('\n');
}

// --- one notification ---------------------------------------------------------------------------

export function renderNotificationEmail(
  kind: NotificationKind,
  payload: NotificationPayload,
  recipient: Recipient,
  links: NotificationLinks,
): RenderedEmail {
  const sentence = describeNotification(kind, payload);
  const subject = sentence.length > 180 ? `${sentence.slice(0, 179)}…` : sentence;
  const detail = detailOf(kind, payload);
  const why = `You get this e-mail because your notification settings send one when ${reasonLine(kind)}.`;

  const text = [
    greeting(recipient),
    '',
    `${sentence}.`,
    ...(detail ? ['', `${detail.label}:`, quoteText(detail.body)] : []),
    '',
    `Open it: ${links.open}`,
    '',
    '-- ',
    why,
    `Stop these e-mails: ${links.unsubscribe}`,
    `All notification settings: ${links.settings}`,
    '',
  ].join('\n');

  const inner = [
    `<p style="margin:0 0 12px">${escapeHtml(greeting(recipient))}</p>`,
    `<p style="margin:0 0 12px;font-size:17px">${escapeHtml(sentence)}.</p>`,
    detail
      ? `<p style="margin:0 0 4px;color:${colors.muted}">${escapeHtml(detail.label)}:</p>` +
        `<blockquote style="margin:0;padding:8px 12px;border-left:3px solid ${colors.rule};color:${colors.ink}">${paragraphs(detail.body)}</blockquote>`
      : '',
    button(links.open, 'Open it on Reworkbook'),
  ].join('\n');
  const footer = `${escapeHtml(why)}<br>${link(links.unsubscribe, 'Stop these e-mails')} · ${link(links.settings, 'Notification settings')}`;
  return { subject, text, html: page(subject, inner, footer) };
}

// --- the daily digest ---------------------------------------------------------------------------

const plural = (n: number, one: string, many: string) => `${n} ${n === 1 ? one : many}`;

export function renderDigestEmail(
  items: DigestItem[],
  recipient: Recipient,
  links: { unsubscribe: string; settings: string; all: string },
): RenderedEmail {
  const shown = items.slice(0, DIGEST_MAX_ITEMS);
  const more = items.length - shown.length;
  const groups = new Map<string, { title: string; items: DigestItem[] }>();
  for (const item of shown) {
    const key = item.payload.projectSlug;
    const group = groups.get(key) ?? { title: collapse(item.payload.projectTitle), items: [] };
    group.items.push(item);
    groups.set(key, group);
  }
  const projectCount = new Set(items.map((i) => i.payload.projectSlug)).size;
  const subject = `Your Reworkbook digest: ${plural(items.length, 'update', 'updates')} on ${plural(projectCount, 'project', 'projects')}`;
  const why = 'You get this digest because your notification settings collect these updates into one daily e-mail.';

  const text = [
    greeting(recipient),
    '',
    'Here is what happened on Reworkbook since your last digest.',
    ...[...groups.values()].flatMap((g) => [
      '',
      g.title,
      ...g.items.flatMap((i) => [`  - ${describeNotification(i.kind, i.payload, false)}`, `    ${i.open}`]),
    ]),
    ...(more > 0 ? ['', `…and ${plural(more, 'more update', 'more updates')}: ${links.all}`] : []),
    '',
    '-- ',
    why,
    `Stop the daily digest: ${links.unsubscribe}`,
    `All notification settings: ${links.settings}`,
    '',
  ].join('\n');

  const inner = [
    `<p style="margin:0 0 12px">${escapeHtml(greeting(recipient))}</p>`,
    '<p style="margin:0 0 8px">Here is what happened on Reworkbook since your last digest.</p>',
    ...[...groups.values()].map(
      (g) =>
        `<h2 style="margin:20px 0 6px;font-size:16px">${escapeHtml(g.title)}</h2>\n<ul style="margin:0;padding-left:20px">\n` +
        g.items
          .map((i) => `<li style="margin:0 0 6px">${link(i.open, describeNotification(i.kind, i.payload, false))}</li>`)
          .join('\n') +
        '\n</ul>',
    ),
    more > 0
      ? `<p style="margin:16px 0 0">…and ${link(links.all, plural(more, 'more update', 'more updates'))}.</p>`
      : '',
  ].join('\n');
  const footer = `${escapeHtml(why)}<br>${link(links.unsubscribe, 'Stop the daily digest')} · ${link(links.settings, 'Notification settings')}`;
  return { subject, text, html: page(subject, inner, footer) };
}
