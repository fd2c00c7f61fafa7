/**
 * Turns the demo contributions (db/demo/contributions) into errata with their revision
 * history, lessons, proposals (an accepted new erratum becomes a credited erratum), discussions
 * and follows. Dated in the past like the write-ups. Everything here is invented for the demo.
 */
import { and, asc, eq, inArray, ne } from 'drizzle-orm';
import type { ErratumFields } from '../../shared/contracts/errata';
import { erratumFieldsSchema } from '../../shared/contracts/errata';
import { slugify } from '../../shared/text';
import { toRevisionFields } from '../../api/errata/service';
import { takeErratumNumber } from '../../api/errata/queries';
import { insertRevision } from '../../api/revisions/queries';
import { contentHash } from '../../api/revisions/versioned';
import type { Tx } from '../client';
import {
  boardRevisions,
  comments,
  documents,
  erratumTags,
  errata,
  flags,
  follows,
  lessonErrata,
  lessonTags,
  lessons,
  projects,
  proposals,
  tags,
  users,
} from '../schema';
import { demoAccounts } from './accounts';
import { demoContributions } from './contributions';
import type { DemoComment, DemoErratumFields } from './types';

type At = (daysAgo: number) => Date;

export async function seedDemoContributions(tx: Tx, id: (login: string) => number, at: At): Promise<void> {
  for (const demo of demoContributions) {
    const [project] = await tx.select().from(projects).where(eq(projects.slug, demo.slug));
    if (!project) throw new Error(`demo contributions for unknown project ${demo.slug}`);
    const boards = await tx.select().from(boardRevisions).where(eq(boardRevisions.projectId, project.id));
    const boardId = (label: string) => {
      const board = boards.find((b) => b.label === label);
      if (!board) throw new Error(`${demo.slug}: no board revision "${label}"`);
      return board.id;
    };
    const toFields = (f: DemoErratumFields): ErratumFields =>
      erratumFieldsSchema.parse({ ...f, affected: f.affected.map(boardId), fixedIn: f.fixedIn === null ? null : boardId(f.fixedIn) });
    const tagId = async (slug: string, author: string) => {
      const [found] = await tx.select({ id: tags.id }).from(tags).where(eq(tags.slug, slug));
      if (found) return found.id;
      const [created] = await tx
        .insert(tags)
        .values({ slug: slugify(slug), name: slug.replace(/-/g, ' '), state: 'pending', createdBy: id(author) })
        .returning({ id: tags.id });
      return created!.id;
    };
    const addComments = async (target: { erratumId: number } | { proposalId: number }, list: DemoComment[] = []) => {
      for (const c of list) {
        await tx.insert(comments).values({ projectId: project.id, authorId: id(c.author), body: c.body, createdAt: at(c.daysAgo), ...target });
      }
    };

    const erratumIds: number[] = [];
    for (const demoErratum of demo.errata) {
      const history = demoErratum.revisions.map((r) => ({ ...r, parsed: toFields(r.fields) }));
      const first = history[0]!;
      const last = history.at(-1)!;
      const number = await takeErratumNumber(tx, project.id);
      const [row] = await tx
        .insert(errata)
        .values({
          projectId: project.id,
          number,
          title: last.parsed.title,
          categorySlug: last.parsed.category,
          severity: last.parsed.severity,
          status: last.parsed.status,
          affected: last.parsed.affected,
          fixedInId: last.parsed.fixedIn,
          refdes: last.parsed.refdes,
          parts: last.parsed.parts,
          pins: last.parsed.pins,
          symptom: last.parsed.symptom,
          cause: last.parsed.cause,
          workaround: last.parsed.workaround,
          fix: last.parsed.fix,
          reportedByText: last.parsed.reportedByText || null,
          reportedById: demoErratum.reportedBy ? id(demoErratum.reportedBy) : null,
          currentRevision: history.length,
          createdBy: id(first.author),
          createdAt: at(first.daysAgo),
          updatedAt: at(last.daysAgo),
        })
        .returning({ id: errata.id });
      erratumIds.push(row!.id);
      for (const [index, revision] of history.entries()) {
        const fields = toRevisionFields(revision.parsed);
        await insertRevision(tx, {
          subject: 'erratum',
          subjectId: row!.id,
          projectId: project.id,
          number: index + 1,
          parentNumber: index === 0 ? null : index,
          authorId: id(revision.author),
          creditedUserId: index === 0 && demoErratum.reportedBy ? id(demoErratum.reportedBy) : null,
          message: revision.message,
          fields,
          contentHash: contentHash(fields),
          origin: index === 0 ? 'create' : 'edit',
          createdAt: at(revision.daysAgo),
        });
      }
      for (const slug of demoErratum.tags) {
        const t = await tagId(slug, first.author);
        await tx.insert(erratumTags).values({ subjectId: row!.id, tagId: t, originalTagId: t }).onConflictDoNothing();
      }
      await addComments({ erratumId: row!.id }, demoErratum.comments);
    }

    for (const [position, lesson] of demo.lessons.entries()) {
      const [row] = await tx
        .insert(lessons)
        .values({ projectId: project.id, body: lesson.body, position, createdBy: id(lesson.author), createdAt: at(lesson.daysAgo), updatedAt: at(lesson.daysAgo) })
        .returning({ id: lessons.id });
      const fields = { body: lesson.body, errata: lesson.errata.map(String).sort() };
      await insertRevision(tx, {
        subject: 'lesson',
        subjectId: row!.id,
        projectId: project.id,
        number: 1,
        parentNumber: null,
        authorId: id(lesson.author),
        message: 'Wrote the lesson',
        body: lesson.body,
        fields,
        contentHash: contentHash(fields),
        origin: 'create',
        createdAt: at(lesson.daysAgo),
      });
      for (const slug of lesson.tags) {
        const t = await tagId(slug, lesson.author);
        await tx.insert(lessonTags).values({ subjectId: row!.id, tagId: t, originalTagId: t }).onConflictDoNothing();
      }
      for (const n of lesson.errata) {
        const erratumId = erratumIds[n - 1];
        if (erratumId === undefined) throw new Error(`${demo.slug}: lesson links E${n}, which does not exist`);
        await tx.insert(lessonErrata).values({ lessonId: row!.id, erratumId });
      }
    }

    for (const proposal of demo.proposals) {
      const decided = proposal.status !== 'open';
      const base = {
        projectId: project.id,
        kind: proposal.kind,
        authorId: id(proposal.author),
        status: proposal.status,
        message: proposal.message,
        createdAt: at(proposal.daysAgo),
        updatedAt: at(proposal.decidedDaysAgo ?? proposal.daysAgo),
        decidedBy: decided ? id(proposal.decidedBy ?? proposal.author) : null,
        decidedAt: decided ? at(proposal.decidedDaysAgo ?? proposal.daysAgo) : null,
        decisionReason: proposal.reason ?? null,
      };
      let values: typeof proposals.$inferInsert;
      if (proposal.kind === 'new_erratum') {
        values = { ...base, payload: toFields(proposal.payload) };
      } else if (proposal.kind === 'erratum_edit') {
        const erratumId = erratumIds[proposal.erratumNumber - 1];
        if (erratumId === undefined) throw new Error(`${demo.slug}: proposal on E${proposal.erratumNumber}, which does not exist`);
        const [target] = await tx.select({ revision: errata.currentRevision }).from(errata).where(eq(errata.id, erratumId));
        values = { ...base, erratumId, baseRevision: target!.revision, payload: toFields(proposal.payload) };
      } else {
        const [doc] = await tx
          .select()
          .from(documents)
          .where(and(eq(documents.projectId, project.id), eq(documents.kind, 'section'), eq(documents.title, proposal.sectionTitle)));
        if (!doc) throw new Error(`${demo.slug}: proposal on section "${proposal.sectionTitle}", which does not exist`);
        values = { ...base, documentId: doc.id, baseRevision: doc.currentRevision, payload: { ...proposal.payload, loggedOn: null } };
      }
      const [row] = await tx.insert(proposals).values(values).returning({ id: proposals.id });
      if (proposal.kind === 'new_erratum' && proposal.status === 'accepted') {
        // An accepted new erratum became an erratum, credited to the proposer.
        const fields = toFields(proposal.payload);
        const number = await takeErratumNumber(tx, project.id);
        const when = at(proposal.decidedDaysAgo ?? proposal.daysAgo);
        const [created] = await tx
          .insert(errata)
          .values({
            projectId: project.id,
            number,
            title: fields.title,
            categorySlug: fields.category,
            severity: fields.severity,
            status: fields.status,
            affected: fields.affected,
            fixedInId: fields.fixedIn,
            refdes: fields.refdes,
            parts: fields.parts,
            pins: fields.pins,
            symptom: fields.symptom,
            cause: fields.cause,
            workaround: fields.workaround,
            fix: fields.fix,
            reportedById: id(proposal.author),
            currentRevision: 1,
            createdBy: base.decidedBy!,
            createdAt: when,
            updatedAt: when,
          })
          .returning({ id: errata.id });
        const revisionFields = toRevisionFields(fields);
        const revision = await insertRevision(tx, {
          subject: 'erratum',
          subjectId: created!.id,
          projectId: project.id,
          number: 1,
          parentNumber: null,
          authorId: base.decidedBy!,
          creditedUserId: id(proposal.author),
          proposalId: row!.id,
          message: `Accepted proposal #${row!.id} from @${proposal.author}`,
          fields: revisionFields,
          contentHash: contentHash(revisionFields),
          origin: 'proposal',
          createdAt: when,
        });
        await tx.update(proposals).set({ erratumId: created!.id, resultRevisionId: revision!.id }).where(eq(proposals.id, row!.id));
      }
      await addComments({ proposalId: row!.id }, proposal.comments);
    }

    if (demo.followers.length) {
      await tx
        .insert(follows)
        .values(demo.followers.map((login) => ({ userId: id(login), projectId: project.id })))
        .onConflictDoNothing();
    }
  }

  // The demo members joined long before their dated contributions, so none counts as a first-day
  // account (api/middleware/rate-limit.ts gives those tighter budgets).
  await tx
    .update(users)
    .set({ createdAt: at(400) })
    .where(inArray(users.id, demoAccounts.map((a) => id(a.login))));

  // One open flag for the demo moderator to handle: a member questions someone else's comment.
  const flagger = id('bram-tolliver');
  const [comment] = await tx
    .select({ id: comments.id, projectId: comments.projectId })
    .from(comments)
    .where(ne(comments.authorId, flagger))
    .orderBy(asc(comments.id))
    .limit(1);
  if (comment) {
    await tx.insert(flags).values({
      targetKind: 'comment',
      targetId: comment.id,
      projectId: comment.projectId,
      authorId: flagger,
      reason: 'wrong',
      text: 'I think this suggestion is mistaken; please check it against the datasheet before anyone follows it.',
      createdAt: at(1),
    });
  }
}
