/**
 * What gets indexed: one search document per project, write-up section, log entry, erratum,
 * lesson and approved tag, built from the source tables in batches. Weights follow what a
 * reader means: titles, part numbers and pin labels (A), tags and errata fields (B), rework
 * text (C), long prose (D).
 */
import { and, eq, inArray, isNull } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import {
  boardRevisions,
  categories,
  documents,
  erratumTags,
  errata,
  lessonTags,
  lessons,
  projects,
  tagAliases,
  tags,
  parts,
} from '../../db/schema';
import type { SearchKind } from '../../shared/contracts/search';
import { codeLexemes } from '../../shared/search/normalize';
import { plainTextOf } from '../markdown/render';

export interface SearchDocument {
  kind: SearchKind;
  refId: number;
  projectId: number | null;
  visible: boolean;
  title: string;
  body: string;
  url: string;
  projectSlug: string | null;
  projectTitle: string | null;
  category: string | null;
  severity: string | null;
  status: string | null;
  tags: string[];
  parts: string[];
  pins: string[];
  updatedAt: Date;
  /** Text per weight, A (most important) to D. */
  weighted: { a: string; b: string; c: string; d: string };
  /** Part numbers, pin labels, voltages (with tails) per weight. */
  codes: { a: string[]; c: string[] };
}

/** The outbox kinds and what they stand for. */
export type OutboxKind = 'project' | 'document' | 'erratum' | 'lesson' | 'tag' | 'part';

type ProjectInfo = { id: number; slug: string; title: string; visible: boolean };

const plain = (markdown: string) => {
  try {
    return plainTextOf(markdown);
  } catch {
    // Over the renderer's size limit: index the raw text, which is still searchable.
    return markdown;
  }
};

async function projectInfo(db: DbOrTx, ids: number[]): Promise<Map<number, ProjectInfo>> {
  if (!ids.length) return new Map();
  const rows = await db
    .select({ id: projects.id, slug: projects.slug, title: projects.title, status: projects.status, hidden: projects.hiddenAt, deleted: projects.deletedAt })
    .from(projects)
    .where(inArray(projects.id, ids));
  // A deleted project's items leave the index for everyone, its members included.
  return new Map(rows.filter((r) => !r.deleted).map((r) => [r.id, { id: r.id, slug: r.slug, title: r.title, visible: r.status === 'published' && !r.hidden }]));
}

/** Tag names with their aliases, per item, for the tag fields of errata and lessons. */
async function tagNames(db: DbOrTx, table: typeof erratumTags | typeof lessonTags, ids: number[]) {
  const map = new Map<number, { slugs: string[]; words: string[] }>();
  if (!ids.length) return map;
  const rows = await db
    .select({ subjectId: table.subjectId, tagId: tags.id, slug: tags.slug, name: tags.name })
    .from(table)
    .innerJoin(tags, eq(tags.id, table.tagId))
    .where(inArray(table.subjectId, ids));
  const aliases = rows.length
    ? await db.select().from(tagAliases).where(inArray(tagAliases.tagId, [...new Set(rows.map((r) => r.tagId))]))
    : [];
  for (const row of rows) {
    const entry = map.get(row.subjectId) ?? { slugs: [], words: [] };
    entry.slugs.push(row.slug);
    // Aliases are synonyms: an item tagged "analog-only-pin" is found by its alias "adc-only-pin" too.
    entry.words.push(row.name, row.slug.replace(/-/g, ' '), ...aliases.filter((a) => a.tagId === row.tagId).map((a) => a.alias.replace(/-/g, ' ')));
    map.set(row.subjectId, entry);
  }
  return map;
}

export async function buildProjects(db: DbOrTx, ids: number[]): Promise<Map<number, SearchDocument | null>> {
  const out = new Map<number, SearchDocument | null>(ids.map((id) => [id, null]));
  if (!ids.length) return out;
  const rows = await db.select().from(projects).where(inArray(projects.id, ids));
  const boards = await db.select({ projectId: boardRevisions.projectId, label: boardRevisions.label }).from(boardRevisions).where(inArray(boardRevisions.projectId, ids));
  for (const p of rows) {
    if (p.deletedAt) continue;
    const boardLabels = boards.filter((b) => b.projectId === p.id).map((b) => b.label);
    out.set(p.id, {
      kind: 'project',
      refId: p.id,
      projectId: p.id,
      visible: p.status === 'published' && !p.hiddenAt,
      title: p.title,
      body: p.summary,
      url: `/projects/${p.slug}`,
      projectSlug: p.slug,
      projectTitle: p.title,
      category: null,
      severity: null,
      status: null,
      tags: [],
      parts: [],
      pins: [],
      updatedAt: p.updatedAt,
      weighted: { a: p.title, b: p.summary, c: boardLabels.join(' '), d: '' },
      codes: { a: codeLexemes(`${p.title} ${p.summary}`), c: [] },
    });
  }
  return out;
}

export async function buildDocuments(db: DbOrTx, ids: number[]): Promise<Map<number, SearchDocument | null>> {
  const out = new Map<number, SearchDocument | null>(ids.map((id) => [id, null]));
  if (!ids.length) return out;
  const rows = await db.select().from(documents).where(and(inArray(documents.id, ids), isNull(documents.deletedAt)));
  const info = await projectInfo(db, [...new Set(rows.map((r) => r.projectId))]);
  for (const d of rows) {
    const p = info.get(d.projectId);
    if (!p) continue;
    const text = plain(d.body);
    out.set(d.id, {
      kind: d.kind === 'section' ? 'section' : 'log_entry',
      refId: d.id,
      projectId: p.id,
      visible: p.visible && !d.hiddenAt,
      title: d.title,
      body: text,
      url: d.kind === 'section' ? `/projects/${p.slug}#section-${d.id}` : `/projects/${p.slug}/log/${d.id}`,
      projectSlug: p.slug,
      projectTitle: p.title,
      category: null,
      severity: null,
      status: null,
      tags: [],
      parts: [],
      pins: [],
      updatedAt: d.updatedAt,
      weighted: { a: d.title, b: p.title, c: '', d: text },
      codes: { a: codeLexemes(d.title), c: codeLexemes(text) },
    });
  }
  return out;
}

export async function buildErrata(db: DbOrTx, ids: number[]): Promise<Map<number, SearchDocument | null>> {
  const out = new Map<number, SearchDocument | null>(ids.map((id) => [id, null]));
  if (!ids.length) return out;
  const rows = await db.select().from(errata).where(inArray(errata.id, ids));
  const info = await projectInfo(db, [...new Set(rows.map((r) => r.projectId))]);
  const tagMap = await tagNames(db, erratumTags, rows.map((r) => r.id));
  const categoryNames = new Map((await db.select().from(categories)).map((c) => [c.slug, c.name]));
  for (const e of rows) {
    const p = info.get(e.projectId);
    if (!p) continue;
    const t = tagMap.get(e.id) ?? { slugs: [], words: [] };
    const symptom = plain(e.symptom);
    const cause = plain(e.cause);
    const rework = `${plain(e.workaround)}\n${plain(e.fix)}`;
    const where = [...e.refdes, ...e.parts, ...e.pins].join(' ');
    out.set(e.id, {
      kind: 'erratum',
      refId: e.id,
      projectId: p.id,
      visible: p.visible && !e.hiddenAt,
      title: `E${e.number} ${e.title}`,
      body: [symptom, cause, rework].filter((s) => s.trim()).join('\n'),
      url: `/projects/${p.slug}/errata/E${e.number}`,
      projectSlug: p.slug,
      projectTitle: p.title,
      category: e.categorySlug,
      severity: e.severity,
      status: e.status,
      tags: t.slugs,
      parts: e.parts,
      pins: e.pins,
      updatedAt: e.updatedAt,
      weighted: {
        a: `${e.title} ${where}`,
        b: `${t.words.join(' ')} ${symptom} ${cause} ${categoryNames.get(e.categorySlug) ?? ''}`,
        c: rework,
        d: p.title,
      },
      codes: { a: codeLexemes(`${e.title} ${where}`), c: codeLexemes(`${symptom} ${cause} ${rework}`) },
    });
  }
  return out;
}

export async function buildLessons(db: DbOrTx, ids: number[]): Promise<Map<number, SearchDocument | null>> {
  const out = new Map<number, SearchDocument | null>(ids.map((id) => [id, null]));
  if (!ids.length) return out;
  const rows = await db.select().from(lessons).where(inArray(lessons.id, ids));
  const info = await projectInfo(db, [...new Set(rows.map((r) => r.projectId))]);
  const tagMap = await tagNames(db, lessonTags, rows.map((r) => r.id));
  for (const l of rows) {
    const p = info.get(l.projectId);
    if (!p) continue;
    const t = tagMap.get(l.id) ?? { slugs: [], words: [] };
    const text = plain(l.body);
    out.set(l.id, {
      kind: 'lesson',
      refId: l.id,
      projectId: p.id,
      visible: p.visible && !l.hiddenAt,
      title: text.length > 120 ? `${text.slice(0, 119)}…` : text,
      body: text,
      url: `/projects/${p.slug}#lessons`,
      projectSlug: p.slug,
      projectTitle: p.title,
      category: null,
      severity: null,
      status: null,
      tags: t.slugs,
      parts: [],
      pins: [],
      updatedAt: l.updatedAt,
      weighted: { a: text, b: t.words.join(' '), c: '', d: p.title },
      codes: { a: codeLexemes(text), c: [] },
    });
  }
  return out;
}

export async function buildTags(db: DbOrTx, ids: number[]): Promise<Map<number, SearchDocument | null>> {
  const out = new Map<number, SearchDocument | null>(ids.map((id) => [id, null]));
  if (!ids.length) return out;
  const rows = await db.select().from(tags).where(inArray(tags.id, ids));
  const aliases = await db.select().from(tagAliases).where(inArray(tagAliases.tagId, ids));
  for (const t of rows) {
    if (t.state === 'pending' || t.mergedIntoId) continue;
    const names = [t.name, ...aliases.filter((a) => a.tagId === t.id).map((a) => a.alias.replace(/-/g, ' '))];
    out.set(t.id, {
      kind: 'tag',
      refId: t.id,
      projectId: null,
      visible: true,
      title: t.name,
      body: t.description,
      url: `/tags/${t.slug}`,
      projectSlug: null,
      projectTitle: null,
      category: null,
      severity: null,
      status: null,
      tags: [t.slug],
      parts: [],
      pins: [],
      updatedAt: t.updatedAt,
      weighted: { a: names.join(' '), b: t.description, c: '', d: '' },
      codes: { a: codeLexemes(names.join(' ')), c: [] },
    });
  }
  return out;
}

/**
 * Parts of the library: found by name, alias and what they are. Their pin labels stay out of the
 * text, so a pin label finds the errata about that pin first; the part page lists those anyway.
 */
export async function buildParts(db: DbOrTx, ids: number[]): Promise<Map<number, SearchDocument | null>> {
  const out = new Map<number, SearchDocument | null>(ids.map((id) => [id, null]));
  if (!ids.length) return out;
  const rows = await db.select().from(parts).where(inArray(parts.id, ids));
  for (const p of rows) {
    const profile = p.profile as { summary?: string; datasheets?: { title: string }[] };
    const names = [p.name, ...p.aliases].join(' ');
    const summary = profile.summary ?? '';
    out.set(p.id, {
      kind: 'part',
      refId: p.id,
      projectId: null,
      visible: true,
      title: p.name,
      body: summary,
      url: `/parts/${p.slug}`,
      projectSlug: null,
      projectTitle: null,
      category: null,
      severity: null,
      status: null,
      tags: [],
      parts: [p.name],
      pins: [],
      updatedAt: p.updatedAt,
      weighted: { a: names, b: summary, c: (profile.datasheets ?? []).map((d) => d.title).join(' '), d: '' },
      codes: { a: codeLexemes(names), c: [] },
    });
  }
  return out;
}

/** Ids of everything a project's change may affect (its title and visibility are on each). */
export async function childrenOfProjects(db: DbOrTx, projectIds: number[]) {
  if (!projectIds.length) return { documents: [], errata: [], lessons: [] };
  // One after the other: inside a transaction there is one connection, which runs one query at a time.
  const docs = await db.select({ id: documents.id }).from(documents).where(inArray(documents.projectId, projectIds));
  const errs = await db.select({ id: errata.id }).from(errata).where(inArray(errata.projectId, projectIds));
  const less = await db.select({ id: lessons.id }).from(lessons).where(inArray(lessons.projectId, projectIds));
  return { documents: docs.map((r) => r.id), errata: errs.map((r) => r.id), lessons: less.map((r) => r.id) };
}

/** Ids of the errata and lessons carrying one of these tags. */
export async function itemsWithTags(db: DbOrTx, tagIds: number[]) {
  if (!tagIds.length) return { errata: [], lessons: [] };
  const errs = await db.selectDistinct({ id: erratumTags.subjectId }).from(erratumTags).where(inArray(erratumTags.tagId, tagIds));
  const less = await db.selectDistinct({ id: lessonTags.subjectId }).from(lessonTags).where(inArray(lessonTags.tagId, tagIds));
  return { errata: errs.map((r) => r.id), lessons: less.map((r) => r.id) };
}
