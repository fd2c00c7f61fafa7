/**
 * What every service receives: configuration, the database and the ports to hosted
 * services. Built once per process by api/index.ts (or per test by the harness).
 */
import type { Database, Db } from '../db/client';
import type { Config } from './config';
import type { Outbox } from './fakes/smtp';
import type { Jobs } from './jobs/queue';
import type { Logger } from './log';
import type { Mailer } from './mail/mailer';
import type { Storage } from './storage/port';
import type { SearchBackend } from './search/backend';

export interface AppContext {
  config: Config;
  database: Database;
  db: Db;
  log: Logger;
  /** Where the GitHub OAuth endpoints are: github.com, or the local fake provider. */
  github: GithubEndpoints;
  /** The job queue: enqueue work (e-mail) that must not slow or fail a request. */
  jobs: Jobs;
  /** Outgoing mail; only jobs send. */
  mail: Mailer;
  /** The local mail capture, when it stands in for SMTP (development and tests). */
  outbox?: Outbox;
  /** Answers searches when set (Meilisearch); PostgreSQL full-text otherwise (api/search). */
  searchBackend?: SearchBackend;
  /** Uploaded files: a local folder or S3-compatible storage (api/storage/). */
  storage: Storage;
}

export interface GithubEndpoints {
  clientId: string;
  clientSecret: string;
  authorizationURL: string;
  tokenURL: string;
  userProfileURL: string;
  userEmailURL: string;
  /** True when the local fake stands in for GitHub. */
  fake: boolean;
}

export const realGithub = (clientId: string, clientSecret: string): GithubEndpoints => ({
  clientId,
  clientSecret,
  authorizationURL: 'https://github.com/login/oauth/authorize',
  tokenURL: 'https://github.com/login/oauth/access_token',
  userProfileURL: 'https://api.github.com/user',
  userEmailURL: 'https://api.github.com/user/emails',
  fake: false,
});
