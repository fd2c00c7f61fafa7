import type { Request, RequestHandler, Response } from 'express';
import type { PassportStatic } from 'passport';
import { z } from 'zod';
import { isAppRelativePath } from '../../shared/text';
import type { AppContext } from '../context';
import { AppError } from '../http/errors';
import { access, type ApiRoutes, type AuthUser } from '../http/routes';
import { newCsrfToken } from '../middleware/csrf';
import { rateLimit } from '../middleware/rate-limit';
import { PROVIDER } from './passport';
import { SESSION_COOKIE } from './session-data';



/** Run connect-style middleware to completion: it either calls next or ends the response. */
function runMiddleware(mw: RequestHandler, req: Request, res: Response): Promise<void> {
  return new Promise((resolve, reject) => {
    res.once('finish', () => resolve());
    void mw(req, res, (error?: unknown) => (error ? reject(error) : resolve()));
  });
}

/** Why a sign-in did not complete, as shown on the app's sign-in page. */
function failedRedirect(res: Response, reason: string) {
  res.redirect(303, `/sign-in?failed=${encodeURIComponent(reason)}`);
}

export function registerAuthRoutes(routes: ApiRoutes, ctx: AppContext, passport: PassportStatic) {
  const signInLimit = rateLimit(ctx, {
    name: 'sign-in',
    points: ctx.config.SIGN_IN_RATE_PER_MINUTE,
    durationSeconds: 60,
  });

  routes.get(
    '/auth/github',
    {
      summary: 'Start signing in with GitHub (redirects to the provider)',
      tag: 'auth',
      access: access.public,
      query: z.object({ returnTo: z.string().max(2000).optional() }),
      before: [signInLimit],
      produces: 'text/html',
      status: 302,
    },
    async ({ req, res, query }) => {
      delete req.session.returnTo;
      // Only app-relative paths: a crafted link must not bounce a member to another site.
      if (isAppRelativePath(query.returnTo)) req.session.returnTo = query.returnTo;
      await runMiddleware(passport.authenticate(PROVIDER, { session: true }), req, res);
    },
  );

  routes.get(
    '/auth/github/callback',
    {
      summary: 'Finish signing in: the provider redirects here with a code and the state',
      tag: 'auth',
      access: access.public,
      before: [signInLimit],
      produces: 'text/html',
      status: 303,
    },
    async ({ req, res }) => {
      const outcome = await new Promise<{ user: AuthUser | false; reason?: string }>((resolve, reject) => {
        const mw = passport.authenticate(PROVIDER, (error: unknown, user: AuthUser | false, info?: { message?: string }) => {
          if (error instanceof AppError && error.code === 'suspended') return resolve({ user: false, reason: 'suspended' });
          if (error) {
            ctx.log.warn(`sign-in failed at the provider step: ${(error as Error).message}`);
            return resolve({ user: false, reason: 'provider' });
          }
          if (!user) {
            const reason = /state/i.test(info?.message ?? '') ? 'state' : 'denied';
            return resolve({ user: false, reason });
          }
          resolve({ user });
        }) as RequestHandler;
        void mw(req, res, (error?: unknown) => reject(error ?? new Error('sign-in middleware fell through')));
      });
      if (!outcome.user) return failedRedirect(res, outcome.reason ?? 'denied');
      const user = outcome.user;
      const returnTo = req.session.returnTo;
      // passport 0.7 regenerates the session id here (session fixation), dropping old data.
      await new Promise<void>((resolve, reject) => req.logIn(user, (error) => (error ? reject(error) : resolve())));
      req.session.signedInAt = Date.now();
      req.session.csrfToken = newCsrfToken();
      res.redirect(303, isAppRelativePath(returnTo) ? returnTo : '/');
    },
  );

  routes.post(
    '/auth/signout',
    {
      summary: 'Sign out: ends the session on the server',
      tag: 'auth',
      access: access.signedIn,
      status: 204,
    },
    async ({ req, res }) => {
      await new Promise<void>((resolve, reject) => req.logout((error) => (error ? reject(error) : resolve())));
      await new Promise<void>((resolve, reject) => req.session.destroy((error) => (error ? reject(error) : resolve())));
      res.clearCookie(SESSION_COOKIE, { path: '/', httpOnly: true, sameSite: 'lax', secure: ctx.config.production });
      res.status(204).end();
    },
  );
}
