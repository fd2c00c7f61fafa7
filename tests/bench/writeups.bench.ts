/**
 * Write-ups: saving a revision, diffing two long documents, and reading a project page
 * through the API under load, next to the bare Express baseline measured in the same run.
 */
import { loadConfig } from '../../api/config';
import type { AppContext } from '../../api/context';
import { getDocument, saveDocument } from '../../api/documents/service';
import { fakeGithubEndpoints } from '../../api/fakes/github';
import { createJobs } from '../../api/jobs/queue';
import { createLogger } from '../../api/log';
import { createMailer } from '../../api/mail/mailer';
import { createStorage } from '../../api/storage/storage';
import { createProject } from '../../api/projects/service';
import { findProjectBySlug } from '../../api/projects/queries';
import { toAuthUser } from '../../api/users/service';
import { findUserByHandle } from '../../api/users/queries';
import { diffLinesForView } from '../../shared/diff';
import { mergeText } from '../../shared/merge';
import { fmt, load, percentile, startBenchDatabase, startBenchServers, timeRuns } from './harness';

/** A deterministic pseudo-random document of `lines` lines of Markdown-ish prose. */
function document(lines: number, seed: number): string[] {
  let state = seed;
  const next = () => {
    state = (state * 1_103_515_245 + 12_345) & 0x7fffffff;
    return state;
  };
  const words = ['relay', 'regulator', 'trace', 'pin', 'firmware', 'board', 'header', 'ground', 'supply', 'sensor', 'bodge', 'wire'];
  return Array.from({ length: lines }, (_, i) =>
    i % 25 === 0 ? `## Part ${i / 25}` : Array.from({ length: 6 + (next() % 8) }, () => words[next() % words.length]).join(' '),
  );
}

export async function run(seconds: number): Promise<string[]> {
  const out: string[] = [];
  const database = await startBenchDatabase();
  const config = loadConfig({ NODE_ENV: 'test', LOG_LEVEL: 'silent' });
  const base = {
    config,
    database,
    db: database.db,
    log: createLogger('silent'),
    github: fakeGithubEndpoints('http://127.0.0.1:9', 'bench', 'bench'),
    mail: createMailer(config),
    // Never written to here: no benchmark in this file uploads.
    storage: createStorage(config),
  };
  // The benchmarks send no mail: the queue is never started, and enqueueing would throw.
  const ctx: AppContext = { ...base, jobs: createJobs(base, { workers: false }) };
  {
    // --- saving a revision (service level: lock, merge check, conditional update, insert) ---
    const row = await findUserByHandle(ctx.db, 'ilse-marrow');
    const user = toAuthUser(row!);
    const created = await createProject(ctx, user, { title: 'Bench Save', summary: '', licence: 'MIT', hazards: [] });
    const project = (await findProjectBySlug(ctx.db, created.slug))!;
    const section = created.sections[0]!;
    const base = document(200, 7).join('\n');
    let revision = 1;
    const saveSamples = await timeRuns(async () => {
      const result = await saveDocument(ctx, user, project, 'owner', section.id, { title: 'Overview', body: `${base}\nsave ${revision}\n`, loggedOn: null, message: '' }, revision);
      revision = result.document.revision;
    }, 300, 30);
    // Saves one revision behind: someone else changed the last line meanwhile, this writer the
    // first line, so each is a three-way merge (only the merging save is timed).
    let text = (await getDocument(ctx, project, 'owner', section.id)).body;
    const mergeSamples: number[] = [];
    for (let i = 0; i < 110; i++) {
      const lines = text.split('\n');
      const theirs = [...lines];
      theirs[theirs.length - 2] = `tail ${i}`;
      const other = await saveDocument(ctx, user, project, 'owner', section.id, { title: 'Overview', body: theirs.join('\n'), loggedOn: null, message: '' }, revision);
      const ours = [...lines];
      ours[0] = `## Part 0 edited ${i}`;
      const started = process.hrtime.bigint();
      const merged = await saveDocument(ctx, user, project, 'owner', section.id, { title: 'Overview', body: ours.join('\n'), loggedOn: null, message: '' }, revision);
      if (i >= 10) mergeSamples.push(Number(process.hrtime.bigint() - started) / 1e6);
      if (merged.outcome !== 'merged' || other.outcome !== 'saved') throw new Error(`expected a merge, got ${merged.outcome}`);
      revision = merged.document.revision;
      text = merged.document.body;
    }
    out.push(
      'Saving a revision of a 200-line section through the service (transaction with row lock, conditional update and revision insert; real PostgreSQL, no HTTP):',
      '',
      '| case | runs | p50 ms | p95 ms |',
      '|---|---|---|---|',
      `| save on the current revision | ${saveSamples.length} | ${fmt(percentile(saveSamples, 50))} | ${fmt(percentile(saveSamples, 95))} |`,
      `| save one revision behind (three-way merge) | ${mergeSamples.length} | ${fmt(percentile(mergeSamples, 50))} | ${fmt(percentile(mergeSamples, 95))} |`,
      '',
    );

    // --- diff of two 5,000-line documents ---
    const a = document(5_000, 1);
    const b = a.map((line, i) => (i % 20 === 3 ? `${line} changed` : line));
    b.splice(2_500, 0, ...document(50, 3));
    const aText = a.join('\n');
    const bText = b.join('\n');
    const diffSamples = await timeRuns(() => diffLinesForView(aText, bText), 20, 3);
    const c = a.map((line, i) => (i % 20 === 13 ? `${line} theirs` : line)).join('\n');
    const mergeTextSamples = await timeRuns(() => mergeText(aText, bText, c), 20, 3);
    out.push(
      'Diff and merge of two 5,000-line documents (250 changed lines plus a 50-line insertion; merge against a third version with 250 other changed lines), in-process:',
      '',
      '| operation | runs | p50 ms | p95 ms |',
      '|---|---|---|---|',
      `| diffLinesForView (line + word diff) | ${diffSamples.length} | ${fmt(percentile(diffSamples, 50))} | ${fmt(percentile(diffSamples, 95))} |`,
      `| mergeText (three-way) | ${mergeTextSamples.length} | ${fmt(percentile(mergeTextSamples, 50))} | ${fmt(percentile(mergeTextSamples, 95))} |`,
      '',
    );
  }

  // --- reading a project page through the API under load ---
  const servers = await startBenchServers(database.url);
  try {
    const baseline = await load('bare Express JSON (baseline)', `${servers.bare}/json`, { seconds });
    const page = await load('GET /api/projects/greenhouse-vent-controller (anonymous)', `${servers.app}/api/projects/greenhouse-vent-controller`, { seconds });
    out.push(
      `Reading a demo project page through the API (autocannon, 10 connections, ${seconds} s each; servers in a child process):`,
      '',
      '| endpoint | req/s | ratio to baseline | p50 ms | p99 ms | non-2xx |',
      '|---|---|---|---|---|---|',
      ...[baseline, page].map(
        (r) =>
          `| ${r.label} | ${fmt(r.requestsPerSecond, 0)} | ${fmt(r.requestsPerSecond / baseline.requestsPerSecond)} | ${fmt(r.latencyP50Ms, 1)} | ${fmt(r.latencyP99Ms, 1)} | ${r.non2xx + r.errors} |`,
      ),
    );
  } finally {
    await servers.stop();
    await database.stop();
  }
  return out;
}
