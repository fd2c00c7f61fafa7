/**
 * What the parts library, pin maps and memory budget routes take and answer. The checks
 * themselves are pure and shared (shared/checks/*): the server runs them for its answers, and
 * the client runs the same code for instant feedback (the level calculator needs no server).
 *
 * Routes (all JSON; unsafe methods need the CSRF token):
 *   GET    /api/parts                                  public      → PartList
 *   GET    /api/parts/:partSlug                        public      → PartPage
 *   POST   /api/parts                                  moderator+  PartCreate → PartPage (201; 409 conflict when the slug is taken)
 *   PUT    /api/parts/:partSlug                        moderator+  PartUpdate → PartPage (409 edit_conflict)
 *   GET    /api/parts/:partSlug/revisions              public      → PartRevisionList
 *   GET    /api/projects/:slug/pin-maps                project read → PinMapList
 *   POST   /api/projects/:slug/pin-maps                project edit PinMapCreate → PinMap (201)
 *   PUT    /api/projects/:slug/pin-maps/:pinMapId      project edit PinMapUpdate → PinMap (409 edit_conflict)
 *   DELETE /api/projects/:slug/pin-maps/:pinMapId      project edit → 204
 *   GET    /api/projects/:slug/pin-maps/:pinMapId/check project read → PinCheckResult
 *   GET    /api/projects/:slug/builds                  project read → BuildList
 *   POST   /api/projects/:slug/builds                  project edit BuildCreate → FirmwareBuild (201; 400 size_report_invalid)
 *   DELETE /api/projects/:slug/builds/:buildId         project edit → 204
 *   PUT    /api/projects/:slug/builds/settings         project edit BuildSettings → BuildList
 */
import { z } from 'zod';
import { partKinds } from '../domain';
import { partProfileSchema, pinMapRowSchema, sourceRefSchema } from './parts';
import { slugSchema } from '../text';

// ---------------------------------------------------------------------------------------------
// Parts

export const partParamsSchema = z.strictObject({ partSlug: slugSchema });

export const partSummarySchema = z
  .object({
    slug: z.string(),
    name: z.string(),
    kind: z.enum(partKinds),
    aliases: z.array(z.string()),
    summary: z.string().nullable(),
    pinCount: z.number().int(),
    /** How many errata and lessons (readable by the viewer) mention the part or its pins. */
    mentionCount: z.number().int(),
  })
  .meta({ id: 'PartSummary' });
export type PartSummary = z.infer<typeof partSummarySchema>;

export const partListSchema = z.object({ items: z.array(partSummarySchema) }).meta({ id: 'PartList' });
export type PartList = z.infer<typeof partListSchema>;

/** An erratum or lesson from any project that names the part (or one of its aliases) or its pins. */
export const partMentionSchema = z
  .object({
    kind: z.enum(['erratum', 'lesson']),
    title: z.string(),
    /** Client route, e.g. /projects/tide-clock/errata/E3. */
    url: z.string(),
    projectSlug: z.string(),
    projectTitle: z.string(),
    /** The part's pins the item names, as the item writes them. */
    pins: z.array(z.string()),
    severity: z.string().nullable(),
    updatedAt: z.string(),
  })
  .meta({ id: 'PartMention' });
export type PartMention = z.infer<typeof partMentionSchema>;

export const partPageSchema = z
  .object({
    profile: partProfileSchema,
    /** Architecture the memory rules use for this part. */
    architecture: z.enum(['avr', 'arm', 'xtensa', 'generic']),
    revision: z.number().int(),
    updatedAt: z.string(),
    mentions: z.array(partMentionSchema),
    viewer: z.object({ canEdit: z.boolean() }),
  })
  .meta({ id: 'PartPage' });
export type PartPage = z.infer<typeof partPageSchema>;

export const partUpdateSchema = z
  .strictObject({
    /** The whole profile as it should be; its slug must match the URL's. */
    profile: partProfileSchema,
    baseRevision: z.number().int().min(1),
    /** What was corrected and from which document. */
    note: z.string().trim().min(3).max(500),
  })
  .meta({ id: 'PartUpdate' });
export type PartUpdate = z.input<typeof partUpdateSchema>;

export const partCreateSchema = z
  .strictObject({
    profile: partProfileSchema,
    /** Where the values come from, for the first revision. */
    note: z.string().trim().min(3).max(500),
  })
  .meta({ id: 'PartCreate' });
export type PartCreate = z.input<typeof partCreateSchema>;

export const partRevisionListSchema = z
  .object({
    items: z.array(
      z.object({
        number: z.number().int(),
        note: z.string(),
        author: z.object({ handle: z.string(), displayName: z.string() }).nullable(),
        createdAt: z.string(),
      }),
    ),
  })
  .meta({ id: 'PartRevisionList' });
export type PartRevisionList = z.infer<typeof partRevisionListSchema>;

// ---------------------------------------------------------------------------------------------
// Pin maps

export const pinMapParamsSchema = z.strictObject({ slug: slugSchema, pinMapId: z.coerce.number().int().min(1) });

const supplyVolts = z.number().finite().min(0.5).max(60).nullable();

export const pinMapCreateSchema = z
  .strictObject({
    boardRevisionId: z.number().int().min(1),
    partSlug: slugSchema,
    /** The part's supply on this board; null: the part's nominal supply. */
    supplyVolts: supplyVolts.default(null),
    rows: z.array(pinMapRowSchema).max(400).default([]),
  })
  .meta({ id: 'PinMapCreate' });
export type PinMapCreate = z.input<typeof pinMapCreateSchema>;

export const pinMapUpdateSchema = z
  .strictObject({
    supplyVolts: supplyVolts,
    rows: z.array(pinMapRowSchema).max(400),
    baseRevision: z.number().int().min(1),
  })
  .meta({ id: 'PinMapUpdate' });
export type PinMapUpdate = z.input<typeof pinMapUpdateSchema>;

export const pinMapSchema = z
  .object({
    id: z.number().int(),
    boardRevision: z.object({ id: z.number().int(), label: z.string() }),
    part: z.object({ slug: z.string(), name: z.string() }),
    supplyVolts: z.number().nullable(),
    rows: z.array(pinMapRowSchema),
    revision: z.number().int(),
    updatedAt: z.string(),
  })
  .meta({ id: 'PinMap' });
export type PinMap = z.infer<typeof pinMapSchema>;

export const pinMapListSchema = z
  .object({ items: z.array(pinMapSchema), viewer: z.object({ canEdit: z.boolean() }) })
  .meta({ id: 'PinMapList' });
export type PinMapList = z.infer<typeof pinMapListSchema>;

/** Mirrors PinFinding in shared/checks/pins.ts. */
export const pinFindingSchema = z
  .object({
    severity: z.enum(['error', 'warning']),
    code: z.string(),
    rowIndexes: z.array(z.number().int()),
    pin: z.string(),
    message: z.string(),
    suggestion: z.string().optional(),
    nearest: z.array(z.string()).optional(),
    source: sourceRefSchema,
  })
  .meta({ id: 'PinFinding' });

export const pinCheckResultSchema = z
  .object({
    pinMapId: z.number().int(),
    part: z.object({ slug: z.string(), name: z.string() }),
    supplyVolts: z.number(),
    findings: z.array(pinFindingSchema),
  })
  .meta({ id: 'PinCheckResult' });
export type PinCheckResult = z.infer<typeof pinCheckResultSchema>;

// ---------------------------------------------------------------------------------------------
// Memory budget

export const buildParamsSchema = z.strictObject({ slug: slugSchema, buildId: z.coerce.number().int().min(1) });

export const MAX_SIZE_REPORT_CHARS = 100_000;

export const buildCreateSchema = z
  .strictObject({
    label: z.string().trim().min(1).max(80),
    /** ISO date (YYYY-MM-DD); null: today. */
    builtOn: z.iso.date().nullable().default(null),
    /** The change this build made ("moved strings to PROGMEM"), for the optimisation ledger. */
    changeNote: z.string().trim().max(300).default(''),
    partSlug: slugSchema,
    /** Output of GNU size in Berkeley, SysV (-A) or GNU (-G) format, pasted or read from a file. */
    reportText: z.string().min(1).max(MAX_SIZE_REPORT_CHARS),
    /** Which file, when the report lists more than one. */
    filename: z.string().trim().min(1).max(200).optional(),
    bootloaderBytes: z
      .number()
      .int()
      .min(0)
      .max(16 * 1024 * 1024)
      .default(0),
  })
  .meta({ id: 'BuildCreate' });
export type BuildCreate = z.input<typeof buildCreateSchema>;

export const firmwareBuildSchema = z
  .object({
    id: z.number().int(),
    label: z.string(),
    builtOn: z.string().nullable(),
    changeNote: z.string(),
    part: z.object({ slug: z.string(), name: z.string() }).nullable(),
    reportFormat: z.enum(['berkeley', 'sysv', 'gnu']),
    reportText: z.string(),
    flashUsed: z.number().int(),
    ramUsed: z.number().int(),
    flashAvailable: z.number().int(),
    ramAvailable: z.number().int(),
    flashPercent: z.number(),
    ramPercent: z.number(),
    bootloaderBytes: z.number().int(),
    /** The rule used, in words, with its source (e.g. the avr-libc rule for AVR). */
    rule: z.string(),
    assumptions: z.array(z.string()),
    /** Bytes against the previous build (older by date, then by id); null for the first. */
    flashDelta: z.number().int().nullable(),
    ramDelta: z.number().int().nullable(),
    warnings: z.object({ flash: z.boolean(), ram: z.boolean() }),
    createdAt: z.string(),
  })
  .meta({ id: 'FirmwareBuild' });
export type FirmwareBuild = z.infer<typeof firmwareBuildSchema>;

export const buildSettingsSchema = z
  .strictObject({ warnAtPercent: z.number().int().min(50).max(100) })
  .meta({ id: 'BuildSettings' });
export type BuildSettings = z.infer<typeof buildSettingsSchema>;

export const buildListSchema = z
  .object({
    /** Oldest first, as the chart draws them. */
    items: z.array(firmwareBuildSchema),
    warnAtPercent: z.number().int(),
    viewer: z.object({ canEdit: z.boolean() }),
  })
  .meta({ id: 'BuildList' });
export type BuildList = z.infer<typeof buildListSchema>;
