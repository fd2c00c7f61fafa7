import { OpenApiGeneratorV31 } from '@asteasolutions/zod-to-openapi';
import type { AppContext } from '../context';
import { access, type ApiRoutes } from '../http/routes';

/** The OpenAPI 3.1 document, generated from the same zod schemas the routes parse with. */
export function registerOpenApiRoute(routes: ApiRoutes, ctx: AppContext) {
  let document: unknown;
  routes.get(
    '/openapi.json',
    {
      summary: 'This API, as an OpenAPI 3.1 document',
      tag: 'meta',
      access: access.public,
      produces: 'application/json',
      session: false,
    },
    ({ res }) => {
      document ??= new OpenApiGeneratorV31(routes.registry.definitions).generateDocument({
        openapi: '3.1.0',
        info: {
          title: 'Reworkbook API',
          version: '1',
          description:
            'JSON over HTTP. Errors are `{ "error": { "code", "message", "details"? } }`. Unsafe methods need the ' +
            'X-CSRF-Token header (from GET /api/me) and a same-origin Origin header.',
        },
        servers: [{ url: ctx.config.appOrigin }],
      });
      res.json(document);
    },
  );
}
