import { slugParamsSchema } from '../../shared/contracts/projects';
import { tagFeedParamsSchema } from '../../shared/contracts/tags';
import type { Response } from 'express';
import type { AppContext } from '../context';
import { access, type ApiRoutes } from '../http/routes';
import { projectFeed, tagFeed, type FeedAnswer } from './service';

const ATOM = 'application/atom+xml';

function send(res: Response, answer: FeedAnswer) {
  if (answer.kind === 'moved') {
    res.redirect(301, answer.location);
    return;
  }
  res
    .type(`${ATOM}; charset=utf-8`)
    .set('Cache-Control', 'public, max-age=300')
    .set('X-Content-Type-Options', 'nosniff')
    .send(answer.xml);
}

export function registerFeedRoutes(routes: ApiRoutes, ctx: AppContext) {
  routes.get(
    '/feeds/tags/:tagSlug.atom',
    {
      summary: "Atom feed of a tag's newest lessons, errata and projects (a merged tag answers 301)",
      tag: 'feeds',
      access: access.public,
      params: tagFeedParamsSchema,
      produces: ATOM,
    },
    async ({ params, res }) => send(res, await tagFeed(ctx, params.tagSlug)),
  );

  routes.get(
    '/feeds/projects/:slug.atom',
    {
      summary: "Atom feed of a published project's newest log entries and errata",
      tag: 'feeds',
      access: access.public,
      params: slugParamsSchema,
      produces: ATOM,
    },
    async ({ params, res }) => send(res, await projectFeed(ctx, params.slug)),
  );
}
