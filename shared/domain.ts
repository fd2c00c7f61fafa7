/**
 * The product's fixed vocabularies (DESIGN.md glossary). The database enums, the zod
 * contracts and the UI labels are all derived from these lists, so a value exists once.
 */

export const siteRoles = ['member', 'moderator', 'admin'] as const;
export type SiteRole = (typeof siteRoles)[number];

export const projectRoles = ['owner', 'editor'] as const;
export type ProjectRole = (typeof projectRoles)[number];

export const projectStatuses = ['draft', 'published'] as const;
export type ProjectStatus = (typeof projectStatuses)[number];

export const documentKinds = ['section', 'log_entry'] as const;
export type DocumentKind = (typeof documentKinds)[number];

export const revisionSubjects = ['project', 'document', 'erratum', 'lesson', 'part', 'pin_map'] as const;
export type RevisionSubject = (typeof revisionSubjects)[number];

export const severities = ['cosmetic', 'minor', 'major', 'critical'] as const;
export type Severity = (typeof severities)[number];
export const severityLabels: Record<Severity, string> = {
  cosmetic: 'Cosmetic',
  minor: 'Minor',
  major: 'Major',
  critical: 'Critical — board does not work without rework',
};

export const erratumStatuses = ['open', 'workaround', 'fixed_later', 'wont_fix'] as const;
export type ErratumStatus = (typeof erratumStatuses)[number];
export const erratumStatusLabels: Record<ErratumStatus, string> = {
  open: 'Open',
  workaround: 'Workaround available',
  fixed_later: 'Fixed in a later revision',
  wont_fix: "Won't fix",
};

/** The starting set of erratum categories (moderators may extend it). */
export const startingCategories = [
  { slug: 'pin-capability', name: 'Pin capability' },
  { slug: 'logic-level', name: 'Logic level' },
  { slug: 'power', name: 'Power' },
  { slug: 'footprint-layout', name: 'Footprint / layout' },
  { slug: 'bom-part-choice', name: 'BOM / part choice' },
  { slug: 'mechanical', name: 'Mechanical' },
  { slug: 'firmware', name: 'Firmware' },
  { slug: 'documentation', name: 'Documentation' },
] as const;

export const proposalKinds = ['new_erratum', 'erratum_edit', 'document_edit'] as const;
export type ProposalKind = (typeof proposalKinds)[number];

export const proposalStatuses = ['open', 'accepted', 'declined', 'withdrawn'] as const;
export type ProposalStatus = (typeof proposalStatuses)[number];

export const tagStates = ['pending', 'approved', 'deprecated'] as const;
export type TagState = (typeof tagStates)[number];

export const partKinds = ['microcontroller', 'module', 'logic_ic', 'logic_family'] as const;
export type PartKind = (typeof partKinds)[number];

export const uploadKinds = ['image', 'attachment'] as const;
export const uploadStates = ['processing', 'ready', 'failed'] as const;

export const flagReasons = ['wrong', 'unsafe', 'spam', 'abusive', 'copyright', 'other'] as const;
export type FlagReason = (typeof flagReasons)[number];
export const flagStates = ['open', 'actioned', 'dismissed'] as const;

export const notificationModes = ['immediate', 'daily', 'off'] as const;
export type NotificationMode = (typeof notificationModes)[number];

/** Hazard marks a project may carry; a marked project shows cautions (DESIGN.md "Cautions"). */
export const hazards = ['mains', 'lithium', 'high_current', 'rf_transmitter', 'laser', 'heat'] as const;
export type Hazard = (typeof hazards)[number];
export const hazardLabels: Record<Hazard, string> = {
  mains: 'Mains voltage',
  lithium: 'Lithium cells',
  high_current: 'High current',
  rf_transmitter: 'RF transmitter',
  laser: 'Laser',
  heat: 'Heat',
};
