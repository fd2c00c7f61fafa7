/**
 * Atom feeds: per tag (its newest lessons, errata and projects) and per project (its newest log
 * entries and errata). Feed readers send no session, so a feed always shows what an anonymous
 * reader may see: published, visible projects only, never hidden content or drafts. Links are
 * absolute, built from the configured APP_ORIGIN.
 */
import { Feed, type Item } from 'feed';
import { sql } from 'drizzle-orm';
import { FEED_ITEM_LIMIT } from '../../shared/contracts/tags';
import { severityLabels, type Severity } from '../../shared/domain';
import type { AppContext } from '../context';
import { fail } from '../http/errors';
import { findProjectBySlug } from '../projects/queries';
import { lookUp } from '../tags/pages';
import * as q from '../tags/queries';

/** Plain text for summaries: Markdown marks dropped, whitespace folded, cut at `max`. */
export function plainText(markdown: string, max = 280): string {
  const text = markdown
    .replace(/!\[[^\]]*\]\([^)]*\)/g, '')
    .replace(/\[([^\]]*)\]\([^)]*\)/g, '$1')
    .replace(/[`*_#>~]/g, '')
    .replace(/\s+/g, ' ')
    .trim();
  return text.length > max ? `${text.slice(0, max - 1).trimEnd()}…` : text;
}

interface Dated extends Item {
  published: Date;
}

function build(
  ctx: AppContext,
  options: { id: string; title: string; description: string; link: string; self: string },
  items: Dated[],
): string {
  const newest = items.map((i) => i.date.getTime()).reduce((a, b) => Math.max(a, b), 0);
  const feed = new Feed({
    id: options.id,
    title: options.title,
    description: options.description,
    link: options.link,
    feedLinks: { atom: options.self },
    updated: newest ? new Date(newest) : new Date(0),
    generator: 'Reworkbook',
    copyright: 'Each item: its project’s licence',
    language: 'en',
  });
  items
    .sort((a, b) => b.published.getTime() - a.published.getTime())
    .slice(0, FEED_ITEM_LIMIT)
    .forEach((item) => feed.addItem(item));
  return feed.atom1();
}

export type FeedAnswer = { kind: 'feed'; xml: string } | { kind: 'moved'; location: string };

export async function tagFeed(ctx: AppContext, slug: string): Promise<FeedAnswer> {
  const found = await lookUp(ctx.db, slug);
  if (!found || found.tag.state === 'pending') throw fail.notFound('The tag');
  const { tag } = found;
  if (found.redirect) return { kind: 'moved', location: `/api/feeds/tags/${tag.slug}.atom` };
  const origin = ctx.config.appOrigin;
  const items = await q.itemsOfTag(ctx.db, q.ANONYMOUS_VIEWER, tag.id, FEED_ITEM_LIMIT);
  const entries: Dated[] = [
    ...items.lessons.map((l) => {
      const link = `${origin}/projects/${l.project_slug}#lessons`;
      return {
        id: `${origin}/projects/${l.project_slug}/lessons/${l.id}`,
        title: `Lesson — ${plainText(l.body, 90)} (${l.project_title})`,
        link,
        description: plainText(l.body),
        date: new Date(l.updated_at),
        published: new Date(l.created_at),
      };
    }),
    ...items.errata.map((e) => {
      const link = `${origin}/projects/${e.project_slug}/errata/E${e.number}`;
      return {
        id: link,
        title: `E${e.number}: ${e.title} (${e.project_title})`,
        link,
        description: `${severityLabels[e.severity as Severity] ?? e.severity}. ${plainText(e.symptom)}`.trim(),
        date: new Date(e.updated_at),
        published: new Date(e.created_at),
      };
    }),
    ...items.projects.map((p) => {
      const link = `${origin}/projects/${p.slug}`;
      return {
        id: link,
        title: `Project: ${p.title}`,
        link,
        description: plainText(p.summary),
        date: new Date(p.updated_at),
        published: new Date(p.created_at),
      };
    }),
  ];
  const xml = build(
    ctx,
    {
      id: `${origin}/tags/${tag.slug}`,
      title: `Reworkbook — tag “${tag.name}”`,
      description: tag.description || `Lessons, errata and projects tagged “${tag.name}”.`,
      link: `${origin}/tags/${tag.slug}`,
      self: `${origin}/api/feeds/tags/${tag.slug}.atom`,
    },
    entries,
  );
  return { kind: 'feed', xml };
}

export async function projectFeed(ctx: AppContext, slug: string): Promise<FeedAnswer> {
  const project = await findProjectBySlug(ctx.db, slug);
  if (!project || project.status !== 'published' || project.hiddenAt) throw fail.notFound('The project');
  const origin = ctx.config.appOrigin;
  const base = `${origin}/projects/${project.slug}`;
  const [logs, errata] = await Promise.all([
    ctx.db.execute<{
      id: number;
      title: string;
      body: string;
      logged_on: string | null;
      created_at: Date;
      updated_at: Date;
    }>(sql`
      SELECT id, title, body, logged_on, created_at, updated_at FROM documents
      WHERE project_id = ${project.id} AND kind = 'log_entry' AND deleted_at IS NULL AND hidden_at IS NULL
      ORDER BY created_at DESC, id DESC LIMIT ${FEED_ITEM_LIMIT}`),
    ctx.db.execute<{
      number: number;
      title: string;
      severity: string;
      symptom: string;
      created_at: Date;
      updated_at: Date;
    }>(sql`
      SELECT number, title, severity, symptom, created_at, updated_at FROM errata
      WHERE project_id = ${project.id} AND hidden_at IS NULL
      ORDER BY created_at DESC, id DESC LIMIT ${FEED_ITEM_LIMIT}`),
  ]);
  const entries: Dated[] = [
    ...logs.rows.map((d) => ({
      id: `${base}/log/${d.id}`,
      title: `Log: ${d.title}${d.logged_on ? ` (${d.logged_on})` : ''}`,
      link: `${base}/log/${d.id}`,
      description: plainText(d.body),
      date: new Date(d.updated_at),
      published: new Date(d.created_at),
    })),
    ...errata.rows.map((e) => ({
      id: `${base}/errata/E${e.number}`,
      title: `E${e.number}: ${e.title}`,
      link: `${base}/errata/E${e.number}`,
      description: `${severityLabels[e.severity as Severity] ?? e.severity}. ${plainText(e.symptom)}`.trim(),
      date: new Date(e.updated_at),
      published: new Date(e.created_at),
    })),
  ];
  const xml = build(
    ctx,
    {
      id: base,
      title: `Reworkbook — ${project.title}`,
      description: project.summary || `New log entries and errata of ${project.title}.`,
      link: base,
      self: `${origin}/api/feeds/projects/${project.slug}.atom`,
    },
    entries,
  );
  return { kind: 'feed', xml };
}
