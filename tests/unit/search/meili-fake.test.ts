/**
 * The local Meilisearch fake: its tokenizer, query parser, typo rule and filter language, then
 * what the real SDK sees over loopback (tasks, errors, search semantics). Expected values are
 * worked out by hand from the documented rules in api/fakes/meilisearch.ts.
 */
import { Meilisearch, MeilisearchApiError } from 'meilisearch';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  FilterError,
  editDistance,
  filterOf,
  matchWord,
  matchesFilter,
  parseFilter,
  parseQuery,
  startFakeMeilisearch,
  tokenize,
  typoBudget,
  type RunningFakeMeilisearch,
} from '../../../api/fakes/meilisearch';

describe('tokenizer', () => {
  it('lowercases, drops accents and keeps the offsets of the original text', () => {
    const text = 'Ünïcode café, GPIO35';
    const tokens = tokenize(text);
    expect(tokens.map((t) => t.word)).toEqual(['unicode', 'cafe', 'gpio35']);
    expect(tokens.map((t) => text.slice(t.start, t.end))).toEqual(['Ünïcode', 'café', 'GPIO35']);
  });

  it('puts words across a sentence end 8 positions apart, and neighbours 1 apart', () => {
    const tokens = tokenize('pin map. ESP32-WROOM module');
    expect(tokens.map((t) => [t.word, t.position])).toEqual([
      ['pin', 0],
      ['map', 1],
      ['esp32', 9],
      ['wroom', 10],
      ['module', 11],
    ]);
  });

  it('keeps letters and digits together: part numbers and voltages are one word', () => {
    expect(tokenize('ATmega328P at 3v3').map((t) => t.word)).toEqual(['atmega328p', 'at', '3v3']);
  });
});

describe('query terms', () => {
  it('reads phrases, exclusions and a prefix on the last word', () => {
    expect(parseQuery('"analog input only" relay -greenhouse atmeg')).toEqual([
      { words: ['analog', 'input', 'only'], phrase: true, negated: false, prefix: false },
      { words: ['relay'], phrase: false, negated: false, prefix: false },
      { words: ['greenhouse'], phrase: false, negated: true, prefix: false },
      { words: ['atmeg'], phrase: false, negated: false, prefix: true },
    ]);
  });

  it('does not treat the last word as a prefix after a trailing space, nor a hyphen inside a word as exclusion', () => {
    expect(parseQuery('relay ')).toEqual([{ words: ['relay'], phrase: false, negated: false, prefix: false }]);
    expect(parseQuery('SRD-05VDC').map((t) => [t.words, t.negated])).toEqual([
      [['srd'], false],
      [['05vdc'], false],
    ]);
  });

  it('runs an unclosed quote to the end as a phrase, and excludes a quoted phrase', () => {
    expect(parseQuery('-"input only" "brown out')).toEqual([
      { words: ['input', 'only'], phrase: true, negated: true, prefix: false },
      { words: ['brown', 'out'], phrase: true, negated: false, prefix: false },
    ]);
  });
});

describe('typo tolerance', () => {
  it('allows no typo below 5 letters, one from 5 and two from 9 (the documented defaults)', () => {
    expect(typoBudget('pin')).toBe(0);
    expect(typoBudget('gpio')).toBe(0);
    expect(typoBudget('relay')).toBe(1);
    expect(typoBudget('regulato')).toBe(1);
    expect(typoBudget('regulator')).toBe(2);
  });

  it('counts edits, a swap of neighbours as one', () => {
    expect(editDistance('kitten', 'sitting')).toBe(3);
    expect(editDistance('relay', 'realy')).toBe(1);
    // Against prefixes: "atmaga328" is one substitution from the start of "atmega328p".
    expect(editDistance('atmaga328', 'atmega328p', true)).toBe(1);
    expect(editDistance('atmaga328', 'atmega328p', false)).toBe(2);
  });

  it('matches a typo of a part number as a prefix, and counts a wrong first letter twice', () => {
    expect(matchWord('atmaga328', 'atmega328p', true, 2)).toEqual({ typos: 1, exact: false });
    expect(matchWord('gpio35', 'gpio34', false, 1)).toEqual({ typos: 1, exact: false });
    expect(matchWord('relay', 'delay', false, 1)).toBeNull();
    expect(matchWord('pin', 'pins', false, 0)).toBeNull();
    expect(matchWord('pin', 'pins', true, 0)).toEqual({ typos: 0, exact: false });
  });
});

describe('filter parser', () => {
  it('parses comparisons and lists, AND binding tighter than OR', () => {
    expect(parseFilter('visible = true OR project_id IN [3, 7] AND kind != tag')).toEqual({
      type: 'or',
      children: [
        { type: 'compare', attribute: 'visible', op: '=', value: 'true' },
        {
          type: 'and',
          children: [
            { type: 'in', attribute: 'project_id', values: ['3', '7'] },
            { type: 'compare', attribute: 'kind', op: '!=', value: 'tag' },
          ],
        },
      ],
    });
  });

  it('parses NOT, parentheses, quoted values with escapes, ranges and the IS/EXISTS forms', () => {
    expect(parseFilter('NOT (kind = erratum OR kind = lesson)')).toEqual({
      type: 'not',
      child: {
        type: 'or',
        children: [
          { type: 'compare', attribute: 'kind', op: '=', value: 'erratum' },
          { type: 'compare', attribute: 'kind', op: '=', value: 'lesson' },
        ],
      },
    });
    expect(parseFilter(`tags = "logic \\"level\\"" AND category = 'bom part'`)).toEqual({
      type: 'and',
      children: [
        { type: 'compare', attribute: 'tags', op: '=', value: 'logic "level"' },
        { type: 'compare', attribute: 'category', op: '=', value: 'bom part' },
      ],
    });
    expect(parseFilter('kind NOT IN [erratum, "lesson"]')).toEqual({
      type: 'not',
      child: { type: 'in', attribute: 'kind', values: ['erratum', 'lesson'] },
    });
    expect(parseFilter('updated_at 10 TO 20')).toEqual({
      type: 'range',
      attribute: 'updated_at',
      from: '10',
      to: '20',
    });
    expect(parseFilter('severity IS NOT NULL')).toEqual({
      type: 'not',
      child: { type: 'null', attribute: 'severity' },
    });
    expect(parseFilter('tags is empty')).toEqual({ type: 'empty', attribute: 'tags' });
    expect(parseFilter('status NOT EXISTS')).toEqual({ type: 'not', child: { type: 'exists', attribute: 'status' } });
    expect(parseFilter('rank >= 2')).toEqual({ type: 'compare', attribute: 'rank', op: '>=', value: '2' });
  });

  it.each([
    'kind =',
    'kind IN [a, b',
    '(kind = a',
    'kind ~ a',
    'kind = a b',
    'kind = "open',
    '',
    'AND kind = a',
    'kind IS MAYBE',
  ])('refuses %j with a reason', (expression) => {
    expect(() => parseFilter(expression)).toThrow(FilterError);
  });

  it('reads the array form as an AND of ORs', () => {
    expect(filterOf(['kind = erratum', ['severity = major', 'severity = critical']])).toEqual({
      type: 'and',
      children: [
        { type: 'compare', attribute: 'kind', op: '=', value: 'erratum' },
        {
          type: 'or',
          children: [
            { type: 'compare', attribute: 'severity', op: '=', value: 'major' },
            { type: 'compare', attribute: 'severity', op: '=', value: 'critical' },
          ],
        },
      ],
    });
    expect(filterOf(undefined)).toBeNull();
    expect(() => filterOf([3])).toThrow(FilterError);
  });
});

describe('filter evaluation', () => {
  const doc = {
    category: 'Logic level',
    tags: ['power', 'bom'],
    project_id: 7,
    visible: true,
    severity: null,
    rank: 15,
    name: 'Café',
  };
  const passes = (expression: string) => matchesFilter(parseFilter(expression), doc);

  it('compares strings without case or accents, and numbers as numbers', () => {
    expect(passes('category = "logic LEVEL"')).toBe(true);
    expect(passes('name = cafe')).toBe(true);
    expect(passes('project_id = 7')).toBe(true);
    expect(passes('project_id = 07')).toBe(true);
    expect(passes('project_id > 5 AND project_id < 8')).toBe(true);
    expect(passes('rank 10 TO 15')).toBe(true);
    expect(passes('rank 16 TO 20')).toBe(false);
  });

  it('matches an array when one of its values does; != means none does', () => {
    expect(passes('tags = bom')).toBe(true);
    expect(passes('tags IN [firmware, power]')).toBe(true);
    expect(passes('tags != bom')).toBe(false);
    expect(passes('tags NOT IN [firmware]')).toBe(true);
  });

  it('reads booleans as true/false, and knows missing, null and empty attributes apart', () => {
    expect(passes('visible = true')).toBe(true);
    expect(passes('visible = false')).toBe(false);
    expect(passes('status != open')).toBe(true);
    expect(passes('status EXISTS')).toBe(false);
    expect(passes('severity EXISTS AND severity IS NULL')).toBe(true);
    expect(passes('tags IS EMPTY')).toBe(false);
    expect(passes('NOT visible = true OR project_id IN [1, 7]')).toBe(true);
  });
});

describe('over HTTP, through the SDK', () => {
  let fake: RunningFakeMeilisearch;
  let client: Meilisearch;
  const docs = [
    {
      id: 'e-1',
      kind: 'erratum',
      title: 'Regulator overheats under load',
      body: 'The LDO regulator gets hot when the relay and the pump run together.',
      tags: ['power'],
      visible: true,
      rank: 3,
    },
    {
      id: 'e-2',
      kind: 'erratum',
      title: 'Relay clicks at power-up',
      body: 'The relay input floats while the microcontroller is in reset; the pin is input only until setup runs.',
      tags: ['power', 'firmware'],
      visible: true,
      rank: 1,
    },
    {
      id: 'l-1',
      kind: 'lesson',
      title: 'Read the pin table',
      body: 'Only input pins cannot drive a relay from mains-side circuits.',
      tags: ['pin-capability'],
      visible: false,
      rank: 2,
    },
    {
      id: 'p-1',
      kind: 'project',
      title: 'Café timer',
      body: 'A kitchen timer with a buzzer.',
      tags: [],
      visible: true,
      rank: 4,
    },
  ];
  const ids = async (q: string, options: Record<string, unknown> = {}) =>
    (await client.index('notes').search(q, options)).hits.map((h) => h.id);

  beforeAll(async () => {
    fake = await startFakeMeilisearch({ apiKey: 'local-test-key' });
    client = new Meilisearch({ host: fake.url, apiKey: 'local-test-key' });
    expect((await client.createIndex('notes', { primaryKey: 'id' }).waitTask()).status).toBe('succeeded');
    const settings = await client
      .index('notes')
      .updateSettings({
        searchableAttributes: ['title', 'body'],
        filterableAttributes: ['kind', 'tags', 'visible'],
        sortableAttributes: ['rank'],
      })
      .waitTask();
    expect(settings.status).toBe('succeeded');
    expect((await client.index('notes').addDocuments(docs).waitTask()).status).toBe('succeeded');
  });
  afterAll(async () => {
    await fake.close();
  });

  it('answers health without a key, and refuses a missing or wrong key', async () => {
    expect(await new Meilisearch({ host: fake.url }).health()).toEqual({ status: 'available' });
    const missing = await new Meilisearch({ host: fake.url })
      .index('notes')
      .search('relay')
      .catch((e: unknown) => e);
    expect(missing).toBeInstanceOf(MeilisearchApiError);
    expect((missing as MeilisearchApiError).cause).toMatchObject({
      code: 'missing_authorization_header',
      type: 'auth',
    });
    expect((missing as MeilisearchApiError).response.status).toBe(401);
    const wrong = await new Meilisearch({ host: fake.url, apiKey: 'nope' })
      .index('notes')
      .search('relay')
      .catch((e: unknown) => e);
    expect((wrong as MeilisearchApiError).cause).toMatchObject({ code: 'invalid_api_key' });
    expect((wrong as MeilisearchApiError).response.status).toBe(403);
  });

  it('reports a refused write as a failed task, and changes nothing', async () => {
    const task = await client
      .index('notes')
      .addDocuments([
        { id: 'ok-1', title: 'fine' },
        { id: 'not valid', title: 'space in the id' },
      ])
      .waitTask();
    expect(task).toMatchObject({
      status: 'failed',
      type: 'documentAdditionOrUpdate',
      error: { code: 'invalid_document_id' },
    });
    expect((await client.index('notes').getStats()).numberOfDocuments).toBe(4);
    const again = await client.createIndex('notes').waitTask();
    expect(again).toMatchObject({ status: 'failed', error: { code: 'index_already_exists' } });
  });

  it('ranks a match in the first searchable attribute before matches further down', async () => {
    expect(await ids('relay')).toEqual(['e-2', 'e-1', 'l-1']);
  });

  it('requires every word with matchingStrategy all, and keeps a leading run with last', async () => {
    expect(await ids('relay pump', { matchingStrategy: 'all' })).toEqual(['e-1']);
    expect(await ids('relay pump', { matchingStrategy: 'last' })).toEqual(['e-1', 'e-2', 'l-1']);
  });

  it('matches phrases as consecutive words, excludes -words, and finds prefixes, typos and accents', async () => {
    expect(await ids('"input only"')).toEqual(['e-2']);
    expect(await ids('relay -mains')).toEqual(['e-2', 'e-1']);
    expect(await ids('regul')).toEqual(['e-1']);
    expect(await ids('regulatr')).toEqual(['e-1']);
    expect(await ids('cafe')).toEqual(['p-1']);
    expect(await ids('zzqxv')).toEqual([]);
  });

  it('filters, and counts facets over every match whatever the limit', async () => {
    expect(await ids('relay', { filter: 'kind = erratum AND visible = true' })).toEqual(['e-2', 'e-1']);
    expect(await ids('', { filter: [['kind = lesson', 'kind = project']] })).toEqual(['l-1', 'p-1']);
    const res = await client.index('notes').search('relay', { facets: ['kind', 'tags'], limit: 1 });
    expect(res.hits).toHaveLength(1);
    expect(res.estimatedTotalHits).toBe(3);
    expect(res.facetDistribution).toEqual({
      kind: { erratum: 2, lesson: 1 },
      tags: { firmware: 1, 'pin-capability': 1, power: 2 },
    });
  });

  it('refuses filters, facets and sorts on attributes not declared for them, and unknown parameters', async () => {
    const codeOf = (e: unknown) => (e as MeilisearchApiError).cause?.code;
    expect(
      codeOf(
        await client
          .index('notes')
          .search('relay', { filter: 'title = x' })
          .catch((e: unknown) => e),
      ),
    ).toBe('invalid_search_filter');
    expect(
      codeOf(
        await client
          .index('notes')
          .search('relay', { filter: 'kind = ' })
          .catch((e: unknown) => e),
      ),
    ).toBe('invalid_search_filter');
    expect(
      codeOf(
        await client
          .index('notes')
          .search('relay', { facets: ['title'] })
          .catch((e: unknown) => e),
      ),
    ).toBe('invalid_search_facets');
    expect(
      codeOf(
        await client
          .index('notes')
          .search('relay', { sort: ['title:asc'] })
          .catch((e: unknown) => e),
      ),
    ).toBe('invalid_search_sort');
    expect(
      codeOf(
        await client
          .index('notes')
          .search('relay', { showRankingScore: true })
          .catch((e: unknown) => e),
      ),
    ).toBe('bad_request');
    expect(
      codeOf(
        await client
          .index('missing')
          .search('relay')
          .catch((e: unknown) => e),
      ),
    ).toBe('index_not_found');
  });

  it('sorts a placeholder search by a sortable attribute', async () => {
    expect(await ids('', { sort: ['rank:asc'] })).toEqual(['e-2', 'l-1', 'e-1', 'p-1']);
    expect(await ids('', { sort: ['rank:desc'], limit: 2, offset: 1 })).toEqual(['e-1', 'l-1']);
  });

  it('highlights matched words with the given tags and crops around them', async () => {
    const [hit] = (
      await client.index('notes').search('setup', {
        attributesToHighlight: ['title', 'body'],
        attributesToCrop: ['body'],
        cropLength: 4,
        highlightPreTag: '[',
        highlightPostTag: ']',
      })
    ).hits;
    expect(hit?._formatted?.body).toBe('…only until [setup] runs');
    expect(hit?._formatted?.title).toBe('Relay clicks at power-up');
    const [cafe] = (await client.index('notes').search('cafe', { attributesToHighlight: ['*'] })).hits;
    expect(cafe?._formatted).toMatchObject({ title: '<em>Café</em> timer', rank: '4' });
  });

  it('deletes by id, by batch and by filter', async () => {
    await client
      .index('notes')
      .addDocuments([
        { id: 'tmp-1', kind: 'tag', title: 'wombat one' },
        { id: 'tmp-2', kind: 'tag', title: 'wombat two' },
        { id: 'tmp-3', kind: 'tag', title: 'wombat three' },
      ])
      .waitTask();
    expect(await ids('wombat')).toEqual(['tmp-1', 'tmp-2', 'tmp-3']);
    await client.index('notes').deleteDocument('tmp-1').waitTask();
    await client.index('notes').deleteDocuments(['tmp-2']).waitTask();
    expect(await ids('wombat')).toEqual(['tmp-3']);
    const byFilter = await client.index('notes').deleteDocuments({ filter: 'kind = tag' }).waitTask();
    expect(byFilter).toMatchObject({ status: 'succeeded', details: { deletedDocuments: 1 } });
    expect(await ids('wombat')).toEqual([]);
    expect((await client.index('notes').getStats()).numberOfDocuments).toBe(4);
  });
});
