/**
 * A local stand-in for GitHub's OAuth web flow, used in development and tests. It speaks the
 * endpoints passport-github2 calls — authorize, access_token, /user, /user/emails — on
 * loopback, checks the client, the redirect URI, the single-use code and the PKCE verifier,
 * and keeps its own accounts (the demo accounts plus any created on its page).
 *
 * `GET /login/oauth/authorize?...&login=<handle>` with an existing account redirects back at
 * once, for scripts and tests.
 */
import { createHash, randomBytes } from 'node:crypto';
import fs from 'node:fs';
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import express, { type Request, type Response } from 'express';
import { demoAccounts } from '../../db/demo/accounts';

export interface FakeAccount {
  id: number;
  login: string;
  name: string;
  email: string;
}

export interface FakeGithubOptions {
  clientId: string;
  clientSecret: string;
  /** Redirect URIs must start with one of these origins. */
  allowedRedirectOrigins: string[];
  /** Where created accounts are kept between runs; in memory only when omitted. */
  accountsFile?: string;
}

interface PendingCode {
  account: FakeAccount;
  redirectUri: string;
  challenge?: string;
  challengeMethod?: string;
  expires: number;
}

const escapeHtml = (s: string) =>
  s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

const LOGIN_RE = /^[A-Za-z0-9](?:[A-Za-z0-9]|-(?=[A-Za-z0-9])){0,38}$/;

export function createFakeGithub(options: FakeGithubOptions) {
  const accounts = new Map<string, FakeAccount>();
  for (const a of demoAccounts) accounts.set(a.login.toLowerCase(), { id: a.githubId, login: a.login, name: a.name, email: a.email });
  if (options.accountsFile && fs.existsSync(options.accountsFile)) {
    for (const a of JSON.parse(fs.readFileSync(options.accountsFile, 'utf8')) as FakeAccount[]) {
      accounts.set(a.login.toLowerCase(), a);
    }
  }
  const persist = () => {
    if (!options.accountsFile) return;
    const demoIds = new Set(demoAccounts.map((a) => a.githubId));
    fs.mkdirSync(path.dirname(options.accountsFile), { recursive: true });
    fs.writeFileSync(options.accountsFile, JSON.stringify([...accounts.values()].filter((a) => !demoIds.has(a.id)), null, 2));
  };
  const codes = new Map<string, PendingCode>();
  const tokens = new Map<string, FakeAccount>();

  const app = express();
  app.disable('x-powered-by');
  app.use(express.urlencoded({ extended: false, limit: '16kb' }));
  app.use(express.json({ limit: '16kb' }));
  app.use((_req, res, next) => {
    // form-action covers the redirect back to the app after a form is sent, so it lists those origins.
    const formTargets = ["'self'", ...options.allowedRedirectOrigins].join(' ');
    res.set('Content-Security-Policy', `default-src 'none'; style-src 'unsafe-inline'; form-action ${formTargets}; base-uri 'none'`);
    res.set('X-Frame-Options', 'DENY');
    next();
  });

  function checkClient(req: Request, res: Response): { redirectUri: string; state: string } | null {
    const q = { ...req.query, ...(req.body ?? {}) } as Record<string, string | undefined>;
    if (q.client_id !== options.clientId) {
      res.status(400).type('text').send('Unknown client_id.');
      return null;
    }
    const redirectUri = q.redirect_uri ?? '';
    let origin = '';
    try {
      origin = new URL(redirectUri).origin;
    } catch {
      /* refused below */
    }
    if (!options.allowedRedirectOrigins.includes(origin)) {
      res.status(400).type('text').send('The redirect_uri is not registered for this client.');
      return null;
    }
    return { redirectUri, state: q.state ?? '' };
  }

  function grant(res: Response, account: FakeAccount, params: Record<string, string | undefined>, redirectUri: string, state: string) {
    const code = randomBytes(20).toString('hex');
    codes.set(code, {
      account,
      redirectUri,
      ...(params.code_challenge ? { challenge: params.code_challenge } : {}),
      ...(params.code_challenge_method ? { challengeMethod: params.code_challenge_method } : {}),
      expires: Date.now() + 10 * 60_000,
    });
    const target = new URL(redirectUri);
    target.searchParams.set('code', code);
    if (state) target.searchParams.set('state', state);
    res.redirect(302, target.toString());
  }

  const PASSTHROUGH = ['client_id', 'redirect_uri', 'state', 'scope', 'code_challenge', 'code_challenge_method'];

  function page(res: Response, params: Record<string, string | undefined>, problem = '') {
    const hidden = PASSTHROUGH.filter((k) => params[k] !== undefined)
      .map((k) => `<input type="hidden" name="${k}" value="${escapeHtml(params[k]!)}">`)
      .join('');
    const list = [...accounts.values()]
      .map(
        (a) =>
          `<li><form method="get" action="/login/oauth/authorize">${hidden}<input type="hidden" name="login" value="${escapeHtml(a.login)}">` +
          `<button type="submit">Continue as <strong>${escapeHtml(a.name)}</strong> <span>@${escapeHtml(a.login)}</span></button></form></li>`,
      )
      .join('');
    res.type('html').send(`<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Local sign-in provider</title>
<meta name="viewport" content="width=device-width, initial-scale=1">
<style>body{font:16px/1.5 system-ui,sans-serif;max-width:36rem;margin:2rem auto;padding:0 1rem;color:#1d2428}
h1{font-size:1.4rem}ul{list-style:none;padding:0}li{margin:.4rem 0}button{font:inherit;padding:.5rem .9rem;cursor:pointer;width:100%;text-align:left}
button:focus-visible,input:focus-visible{outline:3px solid #c2571a;outline-offset:2px}label{display:block;margin:.5rem 0}input[type=text],input[type=email]{font:inherit;width:100%;padding:.4rem}
.note{background:#fff4d6;padding:.6rem .8rem;border-radius:4px}.problem{color:#a11}</style></head><body>
<h1>Local sign-in provider</h1>
<p class="note">This page stands in for GitHub while Reworkbook runs locally. Nothing leaves this machine.</p>
<h2>Choose an account</h2><ul>${list}</ul>
<h2>Create an account</h2>
${problem ? `<p class="problem" role="alert">${escapeHtml(problem)}</p>` : ''}
<form method="post" action="/login/oauth/authorize/accounts">${hidden}
<label>Handle <input type="text" name="login" required pattern="[A-Za-z0-9](?:[A-Za-z0-9]|-(?=[A-Za-z0-9])){0,38}" autocomplete="username"></label>
<label>Name <input type="text" name="name" required maxlength="80" autocomplete="name"></label>
<label>E-mail <input type="email" name="email" required maxlength="120" autocomplete="email"></label>
<button type="submit">Create and continue</button></form></body></html>`);
  }

  app.get('/login/oauth/authorize', (req, res) => {
    const checked = checkClient(req, res);
    if (!checked) return;
    const params = req.query as Record<string, string | undefined>;
    const login = params.login?.toLowerCase();
    const account = login ? accounts.get(login) : undefined;
    if (account) return grant(res, account, params, checked.redirectUri, checked.state);
    page(res, params, login ? `No account @${params.login} here yet.` : '');
  });

  app.post('/login/oauth/authorize/accounts', (req, res) => {
    const checked = checkClient(req, res);
    if (!checked) return;
    const body = req.body as Record<string, string | undefined>;
    const login = (body.login ?? '').trim();
    const name = (body.name ?? '').trim().slice(0, 80);
    const email = (body.email ?? '').trim().slice(0, 120);
    if (!LOGIN_RE.test(login)) return page(res.status(400), body, 'A handle is letters, digits and single hyphens (at most 39).');
    if (!name || !/^[^@\s]+@[^@\s]+$/.test(email)) return page(res.status(400), body, 'Give a name and an e-mail address.');
    if (accounts.has(login.toLowerCase())) return page(res.status(409), body, `@${login} is taken; choose it from the list instead.`);
    const maxId = Math.max(90_000_000, ...[...accounts.values()].map((a) => a.id));
    const account: FakeAccount = { id: maxId + 1, login, name, email };
    accounts.set(login.toLowerCase(), account);
    persist();
    grant(res, account, body, checked.redirectUri, checked.state);
  });

  app.post('/login/oauth/access_token', (req, res) => {
    const body = { ...(req.body ?? {}) } as Record<string, string | undefined>;
    // Clients may authenticate with HTTP Basic instead of body fields (RFC 6749 §2.3.1).
    const basic = req.get('authorization')?.match(/^Basic (.+)$/i)?.[1];
    if (basic) {
      const [id, secret] = Buffer.from(basic, 'base64').toString().split(':');
      body.client_id ??= decodeURIComponent(id ?? '');
      body.client_secret ??= decodeURIComponent(secret ?? '');
    }
    const refuse = (error: string, description: string) => res.status(400).json({ error, error_description: description });
    if (body.client_id !== options.clientId || body.client_secret !== options.clientSecret) {
      return refuse('incorrect_client_credentials', 'The client_id and/or client_secret passed are incorrect.');
    }
    const pending = body.code ? codes.get(body.code) : undefined;
    if (body.code) codes.delete(body.code); // single use, whatever happens next
    if (!pending || pending.expires < Date.now()) return refuse('bad_verification_code', 'The code passed is incorrect or expired.');
    if (body.redirect_uri && body.redirect_uri !== pending.redirectUri) {
      return refuse('redirect_uri_mismatch', 'The redirect_uri does not match the one used to get the code.');
    }
    if (pending.challenge) {
      const verifier = body.code_verifier ?? '';
      const computed =
        pending.challengeMethod === 'S256' ? createHash('sha256').update(verifier).digest('base64url') : verifier;
      if (computed !== pending.challenge) return refuse('invalid_grant', 'The code_verifier does not match the code_challenge.');
    }
    const token = `fake_${randomBytes(20).toString('hex')}`;
    tokens.set(token, pending.account);
    res.json({ access_token: token, token_type: 'bearer', scope: 'read:user,user:email' });
  });

  function accountFor(req: Request, res: Response): FakeAccount | null {
    const token = req.get('authorization')?.match(/^(?:token|bearer) (.+)$/i)?.[1];
    const account = token ? tokens.get(token) : undefined;
    if (!account) {
      res.status(401).json({ message: 'Bad credentials' });
      return null;
    }
    return account;
  }

  app.get('/user', (req, res) => {
    const a = accountFor(req, res);
    if (!a) return;
    res.json({ login: a.login, id: a.id, name: a.name, email: a.email, avatar_url: null, type: 'User', html_url: `https://example.invalid/${a.login}` });
  });

  app.get('/user/emails', (req, res) => {
    const a = accountFor(req, res);
    if (!a) return;
    res.json([{ email: a.email, primary: true, verified: true, visibility: 'public' }]);
  });

  return { app, accounts };
}

export interface RunningFakeGithub {
  url: string;
  close(): Promise<void>;
  accounts: Map<string, FakeAccount>;
}

export async function startFakeGithub(options: FakeGithubOptions & { port: number; host?: string }): Promise<RunningFakeGithub> {
  const { app, accounts } = createFakeGithub(options);
  const host = options.host ?? '127.0.0.1';
  const server = await new Promise<Server>((resolve, reject) => {
    const s = app.listen(options.port, host, () => resolve(s));
    s.once('error', reject);
  });
  const { port } = server.address() as AddressInfo;
  return {
    url: `http://127.0.0.1:${port}`,
    accounts,
    close: () =>
      new Promise<void>((resolve) => {
        server.close(() => resolve());
        server.closeAllConnections();
      }),
  };
}

/** The endpoints the GitHub strategy should use when the fake runs at `url`. */
export function fakeGithubEndpoints(url: string, clientId: string, clientSecret: string) {
  return {
    clientId,
    clientSecret,
    authorizationURL: `${url}/login/oauth/authorize`,
    tokenURL: `${url}/login/oauth/access_token`,
    userProfileURL: `${url}/user`,
    userEmailURL: `${url}/user/emails`,
    fake: true,
  };
}
