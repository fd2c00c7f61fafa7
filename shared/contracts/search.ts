/**
 * Search across projects. Filters live in the URL (`/search?q=…&kind=erratum&severity=critical`),
 * so a search can be shared; the API takes the same parameters.
 */
import { z } from 'zod';
import { erratumStatuses, severities } from '../domain';

export const searchKinds = ['project', 'section', 'log_entry', 'erratum', 'lesson', 'tag', 'part'] as const;
export type SearchKind = (typeof searchKinds)[number];
export const searchKindLabels: Record<SearchKind, string> = {
  project: 'Projects',
  section: 'Write-up sections',
  log_entry: 'Log entries',
  erratum: 'Errata',
  lesson: 'Lessons',
  tag: 'Tags',
  part: 'Parts',
};

/** Repeated query parameters arrive as arrays, single ones as strings: accept both. */
const many = <T extends z.ZodType>(item: T) =>
  z
    .union([item, z.array(item)])
    .optional()
    .transform((v) => (v === undefined ? [] : Array.isArray(v) ? v : [v]));

export const searchQuerySchema = z.strictObject({
  q: z.string().max(200).default(''),
  kind: many(z.enum(searchKinds)),
  category: many(z.string().max(60)),
  severity: many(z.enum(severities)),
  status: many(z.enum(erratumStatuses)),
  tag: many(z.string().max(60)),
  part: many(z.string().max(80)),
  project: many(z.string().max(80)),
  /** "Known mistakes": errata and lessons only. */
  mistakes: z
    .enum(['1', 'true', '0', 'false'])
    .optional()
    .transform((v) => v === '1' || v === 'true'),
  /** Search the words exactly as typed: no typo correction, no widening to partial matches. */
  exact: z
    .enum(['1', 'true', '0', 'false'])
    .optional()
    .transform((v) => v === '1' || v === 'true'),
  page: z.coerce.number().int().min(1).max(50).default(1),
  pageSize: z.coerce.number().int().min(1).max(50).default(20),
});
export type SearchQuery = z.output<typeof searchQuerySchema>;
export type SearchQueryInput = z.input<typeof searchQuerySchema>;

export const searchHitSchema = z.object({
  kind: z.enum(searchKinds),
  id: z.number().int(),
  title: z.string(),
  /** Title with matches wrapped in <mark> (HTML-escaped otherwise). */
  titleHtml: z.string(),
  /** A snippet of the body with matches wrapped in <mark> (HTML-escaped otherwise). */
  snippetHtml: z.string(),
  url: z.string(),
  project: z.object({ slug: z.string(), title: z.string() }).nullable(),
  category: z.string().nullable(),
  severity: z.enum(severities).nullable(),
  status: z.enum(erratumStatuses).nullable(),
  tags: z.array(z.string()),
  parts: z.array(z.string()),
  pins: z.array(z.string()),
  updatedAt: z.string(),
});
export type SearchHit = z.infer<typeof searchHitSchema>;

export const facetSchema = z.array(z.object({ value: z.string(), label: z.string(), count: z.number().int() }));

export const searchResultSchema = z
  .object({
    query: z.string(),
    /** When nothing matched and a likely typo was corrected, the query that was searched instead. */
    correctedQuery: z.string().nullable(),
    /** Words to offer when nothing matched even after correcting. */
    suggestions: z.array(z.string()),
    total: z.object({ value: z.number().int(), exact: z.boolean() }),
    page: z.number().int(),
    pageSize: z.number().int(),
    items: z.array(searchHitSchema),
    facets: z.object({
      kind: facetSchema,
      category: facetSchema,
      severity: facetSchema,
      status: facetSchema,
      tag: facetSchema,
      part: facetSchema,
      project: facetSchema,
    }),
    /** True when facet counts cover only the best matches (very common words). */
    facetsApproximate: z.boolean(),
    backend: z.enum(['postgres', 'meilisearch']),
  })
  .meta({ id: 'SearchResult' });
export type SearchResult = z.infer<typeof searchResultSchema>;
export type Facet = z.infer<typeof facetSchema>;
