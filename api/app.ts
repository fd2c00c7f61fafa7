/**
 * Builds the Express application: security headers, the /api router (JSON body, session,
 * user, declared routes), the built client with its SPA fallback, and the error middleware.
 * It starts nothing: api/index.ts listens, tests hand the app to supertest.
 */
import fs from 'node:fs';
import path from 'node:path';
import express, { type Express } from 'express';
import helmet from 'helmet';
import { registerAuthRoutes } from './auth/router';
import { createPassport } from './auth/passport';
import { absoluteLifetime, sessionMiddleware } from './auth/session';
import type { AppContext } from './context';
import { registerHealthRoutes } from './health/router';
import { registerMailRoutes } from './mail/router';
import { ApiRoutes } from './http/routes';
import { apiNotFound, errorHandler } from './middleware/errors';
import { registerOpenApiRoute } from './openapi/router';
import { registerUserRoutes } from './users/router';
import { registerProjectRoutes } from './projects/router';
import { registerDocumentRoutes } from './documents/router';
import { registerErrataRoutes } from './errata/router';
import { registerLessonRoutes } from './lessons/router';
import { registerNotificationRoutes } from './notifications/router';
import { registerProposalRoutes } from './proposals/router';
import { registerTagRoutes } from './tags/router';
import { registerFeedRoutes } from './feeds/router';
import { registerUploadRoutes } from './uploads/router';
import { registerSearchRoutes } from './search/router';
import { registerFlagRoutes } from './flags/router';
import { registerModerationRoutes } from './moderation/router';
import { registerAuditRoutes } from './audit/router';
import { registerPartRoutes } from './parts/router';
import { registerPinMapRoutes } from './pin-maps/router';
import { registerBuildRoutes } from './builds/router';

export interface BuiltApp {
  app: Express;
  routes: ApiRoutes;
}

export interface AppOptions {
  /** The built client (vite build output). Omitted: the API is served alone. */
  clientDir?: string;
  /** Extra origins allowed to receive our pages in frames or forms (none by default). */
  formActionOrigins?: string[];
}

/** Every feature registers its routes here, in one place. */
function registerRoutes(routes: ApiRoutes, ctx: AppContext, passport: ReturnType<typeof createPassport>) {
  registerHealthRoutes(routes, ctx);
  registerOpenApiRoute(routes, ctx);
  registerAuthRoutes(routes, ctx, passport);
  registerUserRoutes(routes, ctx);
  registerMailRoutes(routes, ctx);
  registerProjectRoutes(routes, ctx);
  registerDocumentRoutes(routes, ctx);
  registerErrataRoutes(routes, ctx);
  registerLessonRoutes(routes, ctx);
  registerTagRoutes(routes, ctx);
  registerFeedRoutes(routes, ctx);
  registerProposalRoutes(routes, ctx);
  registerNotificationRoutes(routes, ctx);
  registerSearchRoutes(routes, ctx);
  registerUploadRoutes(routes, ctx);
  registerFlagRoutes(routes, ctx);
  registerModerationRoutes(routes, ctx);
  registerAuditRoutes(routes, ctx);
  registerPartRoutes(routes, ctx);
  registerPinMapRoutes(routes, ctx);
  registerBuildRoutes(routes, ctx);
}

export function createApp(ctx: AppContext, options: AppOptions = {}): BuiltApp {
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', ctx.config.TRUST_PROXY ? 1 : false);
  app.set('query parser', 'simple');
  // Every API answer is Cache-Control: no-store, so nobody revalidates it: hashing each body for
  // an ETag was work for nothing. Static files keep theirs (serve-static makes its own).
  app.set('etag', false);

  app.use(
    helmet({
      contentSecurityPolicy: {
        useDefaults: false,
        directives: {
          defaultSrc: ["'self'"],
          scriptSrc: ["'self'"],
          // Vuetify writes its theme variables into a <style> element at run time.
          styleSrc: ["'self'", "'unsafe-inline'"],
          // Write-ups may show images by URL (https) until uploads exist; data:/blob: for previews.
          imgSrc: ["'self'", 'data:', 'blob:', 'https:'],
          fontSrc: ["'self'"],
          connectSrc: ["'self'"],
          objectSrc: ["'none'"],
          baseUri: ["'none'"],
          frameAncestors: ["'none'"],
          formAction: ["'self'", ...(options.formActionOrigins ?? [])],
          ...(ctx.config.production ? { upgradeInsecureRequests: [] } : {}),
        },
      },
      strictTransportSecurity: ctx.config.production ? { maxAge: 31_536_000, includeSubDomains: true } : false,
      referrerPolicy: { policy: 'same-origin' },
      crossOriginEmbedderPolicy: false,
    }),
  );

  const passport = createPassport(ctx);
  const routes = new ApiRoutes(ctx);
  registerRoutes(routes, ctx, passport);

  const api = express.Router();
  api.use((_req, res, next) => {
    res.set('Cache-Control', 'no-store');
    next();
  });
  api.use(express.json({ limit: ctx.config.JSON_BODY_LIMIT, strict: true, type: 'application/json' }));
  api.use(routes.bareRouter);
  api.use(sessionMiddleware(ctx));
  api.use(absoluteLifetime(ctx));
  api.use(passport.initialize());
  api.use(passport.session());
  api.use(routes.router);
  api.use(apiNotFound);
  app.use('/api', api);

  if (options.clientDir && fs.existsSync(path.join(options.clientDir, 'index.html'))) {
    const indexFile = path.join(options.clientDir, 'index.html');
    app.use(
      '/assets',
      express.static(path.join(options.clientDir, 'assets'), { immutable: true, maxAge: '1y', fallthrough: false }),
    );
    app.use(express.static(options.clientDir, { index: false, maxAge: '1h' }));
    // Client-side routes: every other GET that wants a page gets the app, which shows its own 404.
    app.get('/{*splat}', (req, res, next) => {
      if (!req.accepts('html')) return next();
      res.set('Cache-Control', 'no-cache');
      res.sendFile(indexFile);
    });
  }

  app.use(errorHandler(ctx.log));
  return { app, routes };
}
