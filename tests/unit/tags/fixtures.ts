/**
 * Invented tags for the tag tests: a pin-capability tag with a duplicate someone made by another
 * name. Each test states what it expects from these records by hand.
 */
import type { TagPage, TagSummary } from '@shared/contracts/tags';

export function tagSummary(over: Partial<TagSummary> = {}): TagSummary {
  return {
    slug: 'input-only-pin',
    name: 'Input-only pin',
    description: 'A pin that can read but not drive a signal.',
    state: 'approved',
    aliases: [],
    counts: { lessons: 0, errata: 0, projects: 0, total: 0 },
    createdAt: '2026-01-10T09:00:00.000Z',
    updatedAt: '2026-01-10T09:00:00.000Z',
    ...over,
  };
}

export function tagPage(over: Partial<TagPage> = {}): TagPage {
  return {
    kind: 'tag',
    tag: tagSummary({
      aliases: ['read-only-gpio'],
      counts: { lessons: 2, errata: 1, projects: 1, total: 4 },
    }),
    mergedFrom: [{ slug: 'read-only-gpio', name: 'read only gpio' }],
    lessons: [
      {
        id: 41,
        excerpt: 'Check the pin table before routing a relay driver.',
        project: { slug: 'pond-pump-timer', title: 'Pond pump timer' },
        viaSlug: null,
        updatedAt: '2026-02-01T09:00:00.000Z',
        url: '/projects/pond-pump-timer#lesson-41',
      },
      {
        id: 42,
        excerpt: 'The compiler never warns about writing to an input-only pin.',
        project: { slug: 'pond-pump-timer', title: 'Pond pump timer' },
        viaSlug: 'read-only-gpio',
        updatedAt: '2026-02-03T09:00:00.000Z',
        url: '/projects/pond-pump-timer#lesson-42',
      },
    ],
    errata: [
      {
        number: 3,
        code: 'E3',
        title: 'Pump relay never switches',
        severity: 'major',
        status: 'workaround',
        project: { slug: 'pond-pump-timer', title: 'Pond pump timer' },
        viaSlug: null,
        updatedAt: '2026-02-02T09:00:00.000Z',
        url: '/projects/pond-pump-timer/errata/E3',
      },
    ],
    projects: [
      {
        slug: 'pond-pump-timer',
        title: 'Pond pump timer',
        summary: 'Runs a fountain pump on a schedule.',
        status: 'published',
        viaSlug: null,
        updatedAt: '2026-02-04T09:00:00.000Z',
        url: '/projects/pond-pump-timer',
      },
    ],
    feedUrl: '/api/feeds/tags/input-only-pin.atom',
    viewer: { canCurate: false },
    ...over,
  };
}
