/**
 * Turns the demo write-ups (db/demo/write-ups) into projects, members, board revisions,
 * sections and log entries, each with its full revision history, dated in the past so history
 * and diffs read naturally. Everything here is invented for the demo.
 */
import type { ProjectMetaFields } from '../../shared/contracts/projects';
import { insertRevision } from '../../api/revisions/queries';
import { contentHash } from '../../api/revisions/versioned';
import type { Tx } from '../client';
import { boardRevisions, documents, projectMembers, projects } from '../schema';
import type { DemoDocument, DemoProject } from './types';
import { demoWriteUps } from './write-ups';
import { seedDemoContributions } from './contributions-seed';

const DAY = 86_400_000;
/** The demo's "today": log-entry dates are fixed, so revision times count back from here. */
const DEMO_TODAY = Date.parse('2026-12-01T12:00:00Z');

export async function seedDemoContent(
  tx: Tx,
  userIds: Map<string, number>,
  now = new Date(Math.min(Date.now(), DEMO_TODAY)),
): Promise<void> {
  const id = (login: string) => {
    const value = userIds.get(login);
    if (value === undefined) throw new Error(`demo account ${login} missing`);
    return value;
  };
  const at = (daysAgo: number) => new Date(now.getTime() - daysAgo * DAY);
  for (const demo of demoWriteUps) await seedProject(tx, demo, id, at);
  await seedDemoContributions(tx, id, at);
}

function metaFields(meta: DemoProject['meta'][number]): ProjectMetaFields {
  return {
    title: meta.title,
    summary: meta.summary,
    licence: meta.licence,
    licenceOther: meta.licenceOther ?? '',
    repoUrl: meta.repoUrl,
    hazards: [...new Set(meta.hazards)].sort(),
  };
}

async function seedProject(tx: Tx, demo: DemoProject, id: (login: string) => number, at: (daysAgo: number) => Date) {
  const metas = demo.meta.map(metaFields);
  const current = metas.at(-1);
  if (!current) throw new Error(`${demo.slug}: no metadata`);
  const allDocs = [...demo.sections, ...demo.logEntries];
  const newest = Math.min(...demo.meta.map((m) => m.daysAgo), ...allDocs.flatMap((d) => d.revisions.map((r) => r.daysAgo)));
  const [project] = await tx
    .insert(projects)
    .values({
      slug: demo.slug,
      ownerId: id(demo.owner),
      ...current,
      licenceOther: current.licenceOther || null,
      repoUrl: current.repoUrl || null,
      status: demo.status,
      currentRevision: metas.length,
      publishedAt: demo.status === 'published' ? at(demo.meta[0]!.daysAgo - 1) : null,
      createdAt: at(demo.meta[0]!.daysAgo),
      updatedAt: at(newest),
    })
    .returning({ id: projects.id });
  const projectId = project!.id;
  await tx.insert(projectMembers).values({ projectId, userId: id(demo.owner), role: 'owner' });
  for (const editor of demo.editors) await tx.insert(projectMembers).values({ projectId, userId: id(editor), role: 'editor' });

  for (const [index, meta] of demo.meta.entries()) {
    await insertRevision(tx, {
      subject: 'project',
      subjectId: projectId,
      projectId,
      number: index + 1,
      parentNumber: index === 0 ? null : index,
      authorId: id(meta.author),
      message: meta.message,
      fields: metas[index],
      contentHash: contentHash(metas[index]!),
      origin: index === 0 ? 'create' : 'edit',
      createdAt: at(meta.daysAgo),
    });
  }

  if (demo.boards.length) {
    await tx.insert(boardRevisions).values(demo.boards.map((b, position) => ({ ...b, projectId, position })));
  }
  for (const [position, section] of demo.sections.entries()) {
    await seedDocument(tx, projectId, 'section', position, null, section, id, at);
  }
  for (const entry of demo.logEntries) {
    await seedDocument(tx, projectId, 'log_entry', 0, entry.loggedOn, entry, id, at);
  }
}

async function seedDocument(
  tx: Tx,
  projectId: number,
  kind: 'section' | 'log_entry',
  position: number,
  loggedOn: string | null,
  doc: DemoDocument,
  id: (login: string) => number,
  at: (daysAgo: number) => Date,
) {
  const first = doc.revisions[0];
  const last = doc.revisions.at(-1);
  if (!first || !last) throw new Error('a demo document needs at least one revision');
  const [row] = await tx
    .insert(documents)
    .values({
      projectId,
      kind,
      title: last.title,
      body: last.body,
      position,
      loggedOn,
      currentRevision: doc.revisions.length,
      createdBy: id(first.author),
      createdAt: at(first.daysAgo),
      updatedAt: at(last.daysAgo),
    })
    .returning({ id: documents.id });
  for (const [index, revision] of doc.revisions.entries()) {
    await insertRevision(tx, {
      subject: 'document',
      subjectId: row!.id,
      projectId,
      number: index + 1,
      parentNumber: index === 0 ? null : index,
      authorId: id(revision.author),
      message: revision.message,
      title: revision.title,
      body: revision.body,
      fields: { loggedOn },
      contentHash: contentHash({ title: revision.title, body: revision.body, loggedOn }),
      origin: index === 0 ? 'create' : 'edit',
      createdAt: at(revision.daysAgo),
    });
  }
}
