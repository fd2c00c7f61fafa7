/**
 * Sessions in PostgreSQL (connect-pg-simple), so any API process can serve any request.
 * The cookie is HttpOnly, SameSite=Lax, Secure in production, and not named connect.sid.
 * Idle lifetime: the cookie and row expire after SESSION_IDLE_MINUTES without a request
 * (rolling). Absolute lifetime: a session older than SESSION_ABSOLUTE_HOURS since sign-in
 * is ended however active it is.
 */
import connectPgSimple from 'connect-pg-simple';
import type { RequestHandler } from 'express';
import session from 'express-session';
import type { AppContext } from '../context';
import { SESSION_COOKIE } from './session-data';

export function sessionMiddleware(ctx: AppContext): RequestHandler {
  const PgStore = connectPgSimple(session);
  const idleMs = ctx.config.SESSION_IDLE_MINUTES * 60_000;
  return session({
    name: SESSION_COOKIE,
    secret: ctx.config.sessionSecret,
    store: new PgStore({
      pool: ctx.database.pool,
      tableName: 'session',
      createTableIfMissing: false, // the migrations own the table
      // Expired rows are swept by a scheduled job; a timer per app would keep tests alive.
      pruneSessionInterval: false,
      ttl: idleMs / 1000,
    }),
    resave: false,
    saveUninitialized: false,
    rolling: true,
    proxy: ctx.config.TRUST_PROXY,
    cookie: {
      httpOnly: true,
      sameSite: 'lax',
      secure: ctx.config.production,
      maxAge: idleMs,
      path: '/',
    },
  });
}

/** Ends sessions that outlived the absolute lifetime, before anything reads the user. */
export function absoluteLifetime(ctx: AppContext): RequestHandler {
  const limitMs = ctx.config.SESSION_ABSOLUTE_HOURS * 3_600_000;
  return (req, _res, next) => {
    const started = req.session?.signedInAt;
    if (started !== undefined && Date.now() - started > limitMs) {
      // Regenerate: the old session is deleted from the store and the request goes on anonymous.
      req.session.regenerate((error) => next(error));
      return;
    }
    next();
  };
}
