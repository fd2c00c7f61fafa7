import {
  acceptProposalSchema,
  commentInputSchema,
  commentListSchema,
  commentSchema,
  declineProposalSchema,
  proposalDecisionSchema,
  proposalDetailSchema,
  proposalInputSchema,
  proposalListQuerySchema,
  proposalListSchema,
  proposalParamsSchema,
} from '../../shared/contracts/errata';
import { slugParamsSchema } from '../../shared/contracts/projects';
import { listComments } from '../comments/service';
import type { AppContext } from '../context';
import { access, type ApiRoutes } from '../http/routes';
import { memberBudgets, rateLimit } from '../middleware/rate-limit';
import { projectAccess, projectOf } from '../projects/access';
import * as service from './service';

export function registerProposalRoutes(routes: ApiRoutes, ctx: AppContext) {
  const proposing = rateLimit(ctx, memberBudgets.proposals);
  const decisions = rateLimit(ctx, { name: 'writes', points: 300, durationSeconds: 60 });
  const commenting = rateLimit(ctx, memberBudgets.comments);
  const tag = 'proposals';

  routes.post(
    '/projects/:slug/proposals',
    {
      summary: 'Propose a new erratum or an edit (members who do not edit the project)',
      tag,
      access: projectAccess('participate'),
      params: slugParamsSchema,
      body: proposalInputSchema,
      response: proposalDetailSchema,
      status: 201,
      before: [proposing],
    },
    ({ user, locals, body }) => {
      const { project, role } = projectOf(locals);
      return service.createProposal(ctx, user!, project, role, body);
    },
  );

  routes.get(
    '/projects/:slug/proposals',
    {
      summary: "A project's proposals",
      tag,
      access: projectAccess('read'),
      params: slugParamsSchema,
      query: proposalListQuerySchema,
      response: proposalListSchema,
    },
    ({ locals, query }) => service.listProjectProposals(ctx, projectOf(locals).project, query.status),
  );

  routes.get(
    '/me/review-queue',
    {
      summary: 'Open proposals on projects you own or edit',
      tag,
      access: access.signedIn,
      response: proposalListSchema,
    },
    ({ user }) => service.reviewQueue(ctx, user!),
  );

  routes.get(
    '/me/proposals',
    { summary: 'Your proposals', tag, access: access.signedIn, response: proposalListSchema },
    ({ user }) => service.myProposals(ctx, user!),
  );

  /** Readable by whoever can read the project; the service checks it per proposal. */
  const proposalReader = { name: 'reader of the proposal’s project', allowsAnonymous: true, check: () => {} };

  routes.get(
    '/proposals/:proposalId',
    {
      summary: 'A proposal with what reviewing it needs',
      tag,
      access: proposalReader,
      params: proposalParamsSchema,
      response: proposalDetailSchema,
    },
    ({ user, params }) => service.proposalDetail(ctx, params.proposalId, user),
  );

  routes.post(
    '/proposals/:proposalId/accept',
    {
      summary: 'Accept a proposal, as is or edited (owner or editors); exactly once',
      tag,
      access: access.signedIn,
      params: proposalParamsSchema,
      body: acceptProposalSchema,
      response: proposalDecisionSchema,
      before: [decisions],
    },
    ({ user, params, body }) => service.acceptProposal(ctx, user!, params.proposalId, body),
  );

  routes.post(
    '/proposals/:proposalId/decline',
    {
      summary: 'Decline a proposal with a reason (owner or editors); exactly once',
      tag,
      access: access.signedIn,
      params: proposalParamsSchema,
      body: declineProposalSchema,
      response: proposalDecisionSchema,
      before: [decisions],
    },
    ({ user, params, body }) => service.declineProposal(ctx, user!, params.proposalId, body.reason),
  );

  routes.post(
    '/proposals/:proposalId/withdraw',
    {
      summary: 'Withdraw your open proposal',
      tag,
      access: access.signedIn,
      params: proposalParamsSchema,
      response: proposalDecisionSchema,
      before: [decisions],
    },
    ({ user, params }) => service.withdrawProposal(ctx, user!, params.proposalId),
  );

  routes.get(
    '/proposals/:proposalId/comments',
    {
      summary: 'Discussion on a proposal',
      tag,
      access: proposalReader,
      params: proposalParamsSchema,
      response: commentListSchema,
    },
    async ({ user, params }) => {
      await service.loadReadable(ctx, params.proposalId, user);
      return listComments(ctx, { proposalId: params.proposalId }, user);
    },
  );

  routes.post(
    '/proposals/:proposalId/comments',
    {
      summary: 'Comment on a proposal (signed-in members)',
      tag,
      access: access.signedIn,
      params: proposalParamsSchema,
      body: commentInputSchema,
      response: commentSchema,
      status: 201,
      before: [commenting],
    },
    ({ user, params, body }) => service.commentOnProposal(ctx, user!, params.proposalId, body.body),
  );
}
