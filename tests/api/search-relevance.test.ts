/**
 * Relevance over the demo data mixed with generated noise: every labelled must-find item is
 * among the first five results. `npm run bench` reports precision@5 and MRR over the same set.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { indexPending } from '../../api/search/indexer';
import { labelledQueries, matches } from '../fixtures/search-relevance';
import { buildCorpus } from '../bench/search-corpus';
import { createTestApp, type TestApp } from '../setup/app';

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp();
  // Noise that shares the vocabulary makers use (regulator, relay, pin, watchdog …).
  await buildCorpus(t.ctx.db, { projects: 10, errata: 1500, logEntries: 1000 });
  await indexPending(t.ctx);
}, 120_000);
afterAll(async () => {
  await t.close();
});

describe('labelled queries', () => {
  it(`has at least 30 of them`, () => {
    expect(labelledQueries.length).toBeGreaterThanOrEqual(30);
  });

  for (const labelled of labelledQueries) {
    it(`"${labelled.q}" finds what it must in the first five`, async () => {
      const params = new URLSearchParams({ q: labelled.q, ...labelled.params, pageSize: '5' });
      const res = await t.agent().get(`/api/search?${params}`).expect(200);
      const top = res.body.items as { url: string; kind: string; title: string }[];
      for (const target of labelled.mustFind) {
        expect(
          top.some((hit) => matches(target, hit)),
          `${JSON.stringify(target)} not in ${JSON.stringify(top.map((h) => `${h.kind} ${h.url} ${h.title}`))}`,
        ).toBe(true);
      }
    });
  }
});
