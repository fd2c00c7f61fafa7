/**
 * Proposals: a member who does not edit a project suggests a new erratum, or an edit to an
 * erratum, a section or a log entry; the owner or an editor accepts (as is, or edited first)
 * or declines it, or the proposer withdraws it. Each transition happens exactly once: it is a
 * conditional UPDATE (`… WHERE status = 'open'`) in the same transaction as its effects, so two
 * reviewers deciding at once cannot both win — the second gets 409.
 */
import { and, count, desc, eq, inArray, isNull } from 'drizzle-orm';
import { alias } from 'drizzle-orm/pg-core';
import type {
  ErratumFields,
  NotificationPayload,
  ProposalDecision,
  ProposalDetail,
  ProposalInput,
  ProposalList,
  ProposalSummary,
} from '../../shared/contracts/errata';
import { erratumFieldsSchema, proposalInputSchema, type acceptProposalSchema } from '../../shared/contracts/errata';
import type { z } from 'zod';
import { documentContentSchema, type DocumentContent } from '../../shared/contracts/projects';
import { mergeFields } from '../../shared/merge';
import type { ProjectRole } from '../../shared/domain';
import type { DbOrTx, Tx } from '../../db/client';
import { comments, documents, errata, projectMembers, projects, proposals, revisions, users } from '../../db/schema';
import type { AppContext } from '../context';
import { documentStore } from '../documents/service';
import * as documentQueries from '../documents/queries';
import { AppError, fail } from '../http/errors';
import type { AuthUser } from '../http/routes';
import {
  checkAgainstProject,
  code,
  erratumStore,
  fieldsOfRow,
  fromRevisionFields,
  insertErratumWithRevision,
  toRevisionFields,
  type ErratumRevisionFields,
} from '../errata/service';
import * as errataQueries from '../errata/queries';
import { notifyNewErratum } from '../errata/notify';
import { notify, projectMemberIds, withNotifications } from '../notifications/service';
import { canRead } from '../projects/access';
import { hiddenOf, refuseHidden } from '../moderation/visibility';
import { findProjectById, memberRole, touchProject, type ProjectRow } from '../projects/queries';
import { findRevision } from '../revisions/queries';
import { saveVersioned } from '../revisions/versioned';
import { excerptOf, insertComment, threadParticipants } from '../comments/service';
import { syncUploadRefs } from '../uploads/refs';

type ProposalRow = typeof proposals.$inferSelect;

const decider = alias(users, 'decider');

const summaryColumns = {
  proposal: proposals,
  projectSlug: projects.slug,
  projectTitle: projects.title,
  authorHandle: users.handle,
  authorName: users.displayName,
  authorAvatar: users.avatarUrl,
  deciderId: decider.id,
  deciderHandle: decider.handle,
  deciderName: decider.displayName,
  deciderAvatar: decider.avatarUrl,
};

type SummaryRow = {
  proposal: ProposalRow;
  projectSlug: string;
  projectTitle: string;
  authorHandle: string;
  authorName: string;
  authorAvatar: string | null;
  deciderId: number | null;
  deciderHandle: string | null;
  deciderName: string | null;
  deciderAvatar: string | null;
};

function baseQuery(db: DbOrTx) {
  return db
    .select(summaryColumns)
    .from(proposals)
    .innerJoin(projects, eq(projects.id, proposals.projectId))
    .innerJoin(users, eq(users.id, proposals.authorId))
    .leftJoin(decider, eq(decider.id, proposals.decidedBy));
}

async function targetLabels(
  db: DbOrTx,
  rows: ProposalRow[],
): Promise<Map<number, { label: string; erratumNumber: number | null }>> {
  const erratumIds = rows.map((r) => r.erratumId).filter((id): id is number => id !== null);
  const documentIds = rows.map((r) => r.documentId).filter((id): id is number => id !== null);
  const errataRows = erratumIds.length
    ? await db
        .select({ id: errata.id, number: errata.number, title: errata.title })
        .from(errata)
        .where(inArray(errata.id, erratumIds))
    : [];
  const docRows = documentIds.length
    ? await db
        .select({ id: documents.id, title: documents.title })
        .from(documents)
        .where(inArray(documents.id, documentIds))
    : [];
  const map = new Map<number, { label: string; erratumNumber: number | null }>();
  for (const row of rows) {
    const erratum = errataRows.find((e) => e.id === row.erratumId);
    const doc = docRows.find((d) => d.id === row.documentId);
    const proposedTitle = (row.payload as { title?: string }).title ?? '';
    map.set(row.id, {
      label: erratum ? `${code(erratum.number)} ${erratum.title}` : doc ? doc.title : `New erratum: ${proposedTitle}`,
      erratumNumber: erratum?.number ?? null,
    });
  }
  return map;
}

async function toSummaries(db: DbOrTx, rows: SummaryRow[]): Promise<ProposalSummary[]> {
  const labels = await targetLabels(
    db,
    rows.map((r) => r.proposal),
  );
  const ids = rows.map((r) => r.proposal.id);
  const counts = ids.length
    ? await db
        .select({ id: comments.proposalId, n: count() })
        .from(comments)
        .where(and(inArray(comments.proposalId, ids), isNull(comments.hiddenAt)))
        .groupBy(comments.proposalId)
    : [];
  return rows.map((r) => {
    const p = r.proposal;
    const target = labels.get(p.id)!;
    return {
      id: p.id,
      projectSlug: r.projectSlug,
      projectTitle: r.projectTitle,
      kind: p.kind,
      target: { kind: p.kind, erratumNumber: target.erratumNumber, documentId: p.documentId, label: target.label },
      status: p.status,
      author: { id: p.authorId, handle: r.authorHandle, displayName: r.authorName, avatarUrl: r.authorAvatar },
      message: p.message,
      decidedBy:
        r.deciderId !== null
          ? { id: r.deciderId, handle: r.deciderHandle!, displayName: r.deciderName!, avatarUrl: r.deciderAvatar }
          : null,
      decidedAt: p.decidedAt?.toISOString() ?? null,
      decisionReason: p.decisionReason,
      commentCount: counts.find((c) => c.id === p.id)?.n ?? 0,
      createdAt: p.createdAt.toISOString(),
      hidden: hiddenOf(p),
    };
  });
}

const visible = isNull(proposals.hiddenAt);

export async function listProjectProposals(
  ctx: AppContext,
  project: ProjectRow,
  status?: ProposalRow['status'],
): Promise<ProposalList> {
  const rows = await baseQuery(ctx.db)
    .where(and(eq(proposals.projectId, project.id), visible, status ? eq(proposals.status, status) : undefined))
    .orderBy(desc(proposals.createdAt), desc(proposals.id));
  return { items: await toSummaries(ctx.db, rows) };
}

/** Open proposals on every project the member owns or edits, oldest first (first come, first served). */
export async function reviewQueue(ctx: AppContext, user: AuthUser): Promise<ProposalList> {
  const memberOf = ctx.db
    .select({ id: projectMembers.projectId })
    .from(projectMembers)
    .where(eq(projectMembers.userId, user.id));
  const rows = await baseQuery(ctx.db)
    .where(
      and(inArray(proposals.projectId, memberOf), eq(proposals.status, 'open'), visible, isNull(projects.deletedAt)),
    )
    .orderBy(proposals.createdAt, proposals.id);
  return { items: await toSummaries(ctx.db, rows) };
}

export async function myProposals(ctx: AppContext, user: AuthUser): Promise<ProposalList> {
  const rows = await baseQuery(ctx.db)
    .where(and(eq(proposals.authorId, user.id), isNull(projects.deletedAt)))
    .orderBy(desc(proposals.createdAt), desc(proposals.id));
  return { items: await toSummaries(ctx.db, rows) };
}

// --- creating -------------------------------------------------------------------------------

/** The Markdown fields of a proposal's payload (an erratum's texts, or a document's body). */
function markdownOfPayload(payload: unknown): string[] {
  const fields = (payload ?? {}) as Record<string, unknown>;
  return ['body', 'symptom', 'cause', 'workaround', 'fix']
    .map((name) => fields[name])
    .filter((value): value is string => typeof value === 'string');
}

const proposalPath = (id: number) => `/proposals/${id}`;

export async function createProposal(
  ctx: AppContext,
  user: AuthUser,
  project: ProjectRow,
  role: ProjectRole | null,
  input: ProposalInput,
): Promise<ProposalDetail> {
  if (role) throw fail.forbidden('You edit this project: change it directly instead of proposing.');
  const parsed = proposalInputSchema.parse(input);
  const values: typeof proposals.$inferInsert = {
    projectId: project.id,
    kind: parsed.kind,
    authorId: user.id,
    message: parsed.message,
    payload: parsed.payload,
  };
  let targetLabel = `a new erratum: ${parsed.payload.title}`;
  if (parsed.kind === 'new_erratum') {
    await checkAgainstProject(ctx, project, parsed.payload);
  } else if (parsed.kind === 'erratum_edit') {
    const erratum = await errataQueries.findErratum(ctx.db, project.id, parsed.erratumNumber);
    if (!erratum) throw fail.notFound(`Erratum ${code(parsed.erratumNumber)}`);
    if (parsed.baseRevision > erratum.currentRevision)
      throw fail.validation('That revision of the erratum does not exist yet.');
    await checkAgainstProject(ctx, project, parsed.payload);
    Object.assign(values, { erratumId: erratum.id, baseRevision: parsed.baseRevision });
    targetLabel = `${code(erratum.number)} ${erratum.title}`;
  } else {
    const doc = await documentQueries.findDocument(ctx.db, project.id, parsed.documentId);
    if (!doc) throw fail.notFound('The section or log entry');
    if (parsed.baseRevision > doc.currentRevision)
      throw fail.validation('That revision of the text does not exist yet.');
    if (doc.kind === 'log_entry' && !parsed.payload.loggedOn) {
      throw fail.validation('A log entry needs its date.', {
        issues: [{ path: 'payload.loggedOn', message: 'required' }],
      });
    }
    Object.assign(values, {
      documentId: doc.id,
      baseRevision: parsed.baseRevision,
      payload: { ...parsed.payload, loggedOn: doc.kind === 'log_entry' ? parsed.payload.loggedOn : null },
    });
    targetLabel = doc.title;
  }
  const id = await withNotifications(ctx, async (tx, collect) => {
    const [row] = await tx.insert(proposals).values(values).returning({ id: proposals.id });
    // A photo the proposed text shows stays while the proposal is open, so accepting it later finds it.
    await syncUploadRefs(tx, 'proposal', row!.id, project.id, markdownOfPayload(values.payload));
    const payload: NotificationPayload = {
      projectSlug: project.slug,
      projectTitle: project.title,
      actor: { handle: user.handle, displayName: user.displayName },
      proposalId: row!.id,
      proposalKind: parsed.kind,
      targetLabel,
      excerpt: parsed.message ? excerptOf(parsed.message) : undefined,
      path: proposalPath(row!.id),
    };
    collect(await notify(tx, await projectMemberIds(tx, project.id), 'proposal_received', payload, user.id));
    return row!.id;
  });
  return proposalDetail(ctx, id, user);
}

// --- reading ---------------------------------------------------------------------------------

/**
 * Read access: whoever can read the project (drafts: members and admins), and the proposer. A
 * hidden proposal stays readable only to its proposer and the moderators; others get 410.
 */
export async function loadReadable(ctx: AppContext, id: number, user: AuthUser | null) {
  const [row] = await baseQuery(ctx.db).where(eq(proposals.id, id));
  if (!row) throw fail.notFound('The proposal');
  const project = await findProjectById(ctx.db, row.proposal.projectId);
  if (!project || project.deletedAt) throw fail.notFound('The proposal');
  const role = user ? await memberRole(ctx.db, project.id, user.id) : null;
  const isAuthor = user?.id === row.proposal.authorId;
  if (!canRead(project, role, user?.role) && !isAuthor) throw fail.notFound('The proposal');
  refuseHidden(row.proposal, { user, projectRole: role }, 'This proposal', {
    authorId: row.proposal.authorId,
    only: 'author',
  });
  return { row, project, role };
}

type Content = Record<string, unknown>;

async function targetState(
  db: DbOrTx,
  p: ProposalRow,
): Promise<{
  base: Content | null;
  current: Content | null;
  currentRevision: number | null;
  forward: ProposalDetail['forward'];
}> {
  if (p.kind === 'new_erratum') {
    return {
      base: null,
      current: null,
      currentRevision: null,
      forward: { clean: true, fields: p.payload as Content, conflicts: [] },
    };
  }
  if (p.kind === 'erratum_edit') {
    const row = await errataQueries.findErratumById(db, p.erratumId!);
    if (!row) throw fail.notFound('The erratum this proposal was about');
    const baseRow = await findRevision(db, 'erratum', row.id, p.baseRevision!);
    const base = baseRow ? (baseRow.fields as ErratumRevisionFields) : toRevisionFields(fieldsOfRow(row));
    const current = toRevisionFields(fieldsOfRow(row));
    const proposed = toRevisionFields(erratumFieldsSchema.parse(p.payload));
    const merge = mergeFields(base, proposed, current);
    return {
      base: fromRevisionFields(base),
      current: fromRevisionFields(current),
      currentRevision: row.currentRevision,
      forward: {
        clean: merge.clean,
        fields: fromRevisionFields(merge.fields),
        conflicts: merge.clean
          ? []
          : merge.conflicts.map(({ field, base: b, ours, theirs }) => ({ field, base: b, ours, theirs })),
      },
    };
  }
  const [doc] = await db.select().from(documents).where(eq(documents.id, p.documentId!));
  if (!doc) throw fail.notFound('The text this proposal was about');
  const baseRow = await findRevision(db, 'document', doc.id, p.baseRevision!);
  const current = documentQueries.fieldsOf(doc);
  const base = baseRow
    ? {
        title: baseRow.title ?? '',
        body: baseRow.body ?? '',
        loggedOn: ((baseRow.fields as { loggedOn?: string | null } | null)?.loggedOn ?? null) as string | null,
      }
    : current;
  const proposed = documentContentSchema.parse(p.payload);
  const merge = mergeFields(base, proposed, current);
  return {
    base,
    current,
    currentRevision: doc.currentRevision,
    forward: {
      clean: merge.clean,
      fields: merge.fields,
      conflicts: merge.clean
        ? []
        : merge.conflicts.map(({ field, base: b, ours, theirs }) => ({ field, base: b, ours, theirs })),
    },
  };
}

export async function proposalDetail(ctx: AppContext, id: number, user: AuthUser | null): Promise<ProposalDetail> {
  const { row, project, role } = await loadReadable(ctx, id, user);
  const [summary] = await toSummaries(ctx.db, [row]);
  const state = await targetState(ctx.db, row.proposal);
  const boards = await errataQueries.projectBoards(ctx.db, project.id);
  const open = row.proposal.status === 'open';
  return {
    ...summary!,
    baseRevision: row.proposal.baseRevision,
    currentRevision: state.currentRevision,
    base: state.base,
    proposed: row.proposal.payload as Content,
    current: state.current,
    forward: state.forward,
    boards: boards.map((b) => ({ id: b.id, label: b.label })),
    viewer: {
      canReview: open && role !== null,
      canWithdraw: open && user?.id === row.proposal.authorId,
      canComment: user !== null,
    },
  };
}

// --- deciding --------------------------------------------------------------------------------

/** The one transition out of `open`; throws 409 when someone else already made one. */
async function transition(
  tx: Tx,
  id: number,
  to: 'accepted' | 'declined' | 'withdrawn',
  by: AuthUser,
  reason: string | null,
): Promise<ProposalRow> {
  const [row] = await tx
    .update(proposals)
    .set({ status: to, decidedBy: by.id, decidedAt: new Date(), decisionReason: reason, updatedAt: new Date() })
    .where(and(eq(proposals.id, id), eq(proposals.status, 'open')))
    .returning();
  if (row) {
    // Decided: what it proposed now lives (or not) in its target, which holds its own references.
    await syncUploadRefs(tx, 'proposal', row.id, row.projectId, []);
    return row;
  }
  const [current] = await tx
    .select({ status: proposals.status, handle: users.handle })
    .from(proposals)
    .leftJoin(users, eq(users.id, proposals.decidedBy))
    .where(eq(proposals.id, id));
  throw new AppError(
    'conflict',
    `This proposal is already ${current?.status ?? 'decided'}${current?.handle ? ` (by @${current.handle})` : ''}.`,
    {
      status: current?.status,
    },
  );
}

async function requireReviewer(ctx: AppContext, id: number, user: AuthUser) {
  const readable = await loadReadable(ctx, id, user);
  if (!readable.role) throw fail.forbidden('Only the owner and editors of this project decide on its proposals.');
  return readable;
}

function decidedPayload(
  project: ProjectRow,
  reviewer: AuthUser,
  p: ProposalRow,
  decision: 'accepted' | 'declined',
  label: string,
  reason?: string,
): NotificationPayload {
  return {
    projectSlug: project.slug,
    projectTitle: project.title,
    actor: { handle: reviewer.handle, displayName: reviewer.displayName },
    proposalId: p.id,
    proposalKind: p.kind,
    targetLabel: label,
    decision,
    ...(reason ? { reason } : {}),
    path: proposalPath(p.id),
  };
}

export async function acceptProposal(
  ctx: AppContext,
  user: AuthUser,
  id: number,
  input: z.output<typeof acceptProposalSchema>,
): Promise<ProposalDecision> {
  const { row, project } = await requireReviewer(ctx, id, user);
  const labels = await targetLabels(ctx.db, [row.proposal]);
  const author = { id: row.proposal.authorId };
  const result = await withNotifications(ctx, async (tx, collect) => {
    const p = await transition(tx, id, 'accepted', user, null);
    const message =
      input.message ||
      `Accepted proposal #${p.id} from @${row.authorHandle}${p.message ? `: ${p.message}` : ''}`.slice(0, 200);
    let outcome: NonNullable<ProposalDecision['result']>;
    let subject: { kind: 'erratum' | 'document'; id: number };
    if (p.kind === 'new_erratum') {
      const fields: ErratumFields = erratumFieldsSchema.parse(input.payload ?? p.payload);
      await checkAgainstProject({ db: tx }, project, fields);
      const created = await insertErratumWithRevision(tx, project, user, fields, {
        tagIds: [],
        message,
        reportedById: author.id,
        proposalId: p.id,
        origin: 'proposal',
      });
      await tx.update(proposals).set({ erratumId: created.id }).where(eq(proposals.id, p.id));
      collect(await notifyNewErratum(tx, project, user, created));
      outcome = { erratumNumber: created.number, documentId: null, revision: 1 };
      subject = { kind: 'erratum', id: created.id };
    } else if (p.kind === 'erratum_edit') {
      const erratum = await errataQueries.findErratumById(tx, p.erratumId!);
      if (!erratum || erratum.hiddenAt) throw fail.notFound('The erratum this proposal was about');
      const fields: ErratumFields = erratumFieldsSchema.parse(input.payload ?? p.payload);
      await checkAgainstProject({ db: tx }, project, fields);
      // Edited by the reviewer: saved on the revision they looked at; as is: merged forward.
      const base = input.payload ? (input.baseRevision ?? erratum.currentRevision) : p.baseRevision!;
      const saved = await saveVersioned(tx, erratumStore(project, erratum), {
        authorId: user.id,
        baseRevision: base,
        fields: toRevisionFields(fields),
        message,
        origin: 'proposal',
        creditedUserId: author.id,
        proposalId: p.id,
      });
      outcome = { erratumNumber: erratum.number, documentId: null, revision: saved.revision };
      subject = { kind: 'erratum', id: erratum.id };
    } else {
      const doc = await documentQueries.findDocument(tx, project.id, p.documentId!);
      if (!doc) throw fail.notFound('The text this proposal was about');
      const content: DocumentContent = documentContentSchema.parse(input.payload ?? p.payload);
      const base = input.payload ? (input.baseRevision ?? doc.currentRevision) : p.baseRevision!;
      const saved = await saveVersioned(tx, documentStore(project, doc), {
        authorId: user.id,
        baseRevision: base,
        fields: {
          title: content.title,
          body: content.body,
          loggedOn: doc.kind === 'log_entry' ? content.loggedOn : null,
        },
        message,
        origin: 'proposal',
        creditedUserId: author.id,
        proposalId: p.id,
      });
      outcome = { erratumNumber: null, documentId: doc.id, revision: saved.revision };
      subject = { kind: 'document', id: doc.id };
    }
    const [revision] = await tx
      .select({ id: revisions.id })
      .from(revisions)
      .where(
        and(
          eq(revisions.subject, subject.kind),
          eq(revisions.subjectId, subject.id),
          eq(revisions.number, outcome.revision),
        ),
      );
    if (revision) await tx.update(proposals).set({ resultRevisionId: revision.id }).where(eq(proposals.id, p.id));
    await touchProject(tx, project.id);
    collect(
      await notify(
        tx,
        [author.id],
        'proposal_decided',
        decidedPayload(project, user, p, 'accepted', labels.get(p.id)!.label),
        user.id,
      ),
    );
    return outcome;
  });
  return { proposal: await proposalDetail(ctx, id, user), result };
}

export async function declineProposal(
  ctx: AppContext,
  user: AuthUser,
  id: number,
  reason: string,
): Promise<ProposalDecision> {
  const { row, project } = await requireReviewer(ctx, id, user);
  const labels = await targetLabels(ctx.db, [row.proposal]);
  await withNotifications(ctx, async (tx, collect) => {
    const p = await transition(tx, id, 'declined', user, reason);
    collect(
      await notify(
        tx,
        [p.authorId],
        'proposal_decided',
        decidedPayload(project, user, p, 'declined', labels.get(p.id)!.label, reason),
        user.id,
      ),
    );
  });
  return { proposal: await proposalDetail(ctx, id, user), result: null };
}

export async function withdrawProposal(ctx: AppContext, user: AuthUser, id: number): Promise<ProposalDecision> {
  const { row } = await loadReadable(ctx, id, user);
  if (row.proposal.authorId !== user.id) throw fail.forbidden('Only the member who made a proposal can withdraw it.');
  await ctx.db.transaction((tx) => transition(tx, id, 'withdrawn', user, null));
  return { proposal: await proposalDetail(ctx, id, user), result: null };
}

// --- discussion ------------------------------------------------------------------------------

export async function commentOnProposal(ctx: AppContext, user: AuthUser, id: number, body: string) {
  const { row, project } = await loadReadable(ctx, id, user);
  const labels = await targetLabels(ctx.db, [row.proposal]);
  return withNotifications(ctx, async (tx, collect) => {
    const comment = await insertComment(tx, { proposalId: id }, project.id, user, body);
    const recipients = [
      row.proposal.authorId,
      ...(await threadParticipants(tx, { proposalId: id })),
      ...(await projectMemberIds(tx, project.id)),
    ];
    collect(
      await notify(
        tx,
        recipients,
        'comment',
        {
          projectSlug: project.slug,
          projectTitle: project.title,
          actor: { handle: user.handle, displayName: user.displayName },
          proposalId: id,
          proposalKind: row.proposal.kind,
          targetLabel: labels.get(id)!.label,
          excerpt: excerptOf(body),
          path: `${proposalPath(id)}#comment-${comment.id}`,
        },
        user.id,
      ),
    );
    return comment;
  });
}
