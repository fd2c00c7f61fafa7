/**
 * The shape of the demo write-ups (db/demo/write-ups/*.ts). The seed turns each revision into
 * a real revision row, oldest first, so history and diffs have something to show.
 */
import type { LicenceId } from '../../shared/contracts/projects';
import type { ErratumStatus, Hazard, Severity } from '../../shared/domain';

export interface DemoRevision {
  /** Login of a demo account (db/demo/accounts.ts). */
  author: string;
  /** How long ago the revision was saved, in days (fractions allowed). */
  daysAgo: number;
  message: string;
  title: string;
  /** Markdown. */
  body: string;
}

export interface DemoDocument {
  /** Oldest first; the last one is the current text. */
  revisions: DemoRevision[];
}

export interface DemoLogEntry extends DemoDocument {
  /** YYYY-MM-DD */
  loggedOn: string;
}

export interface DemoProjectMeta {
  title: string;
  summary: string;
  licence: LicenceId;
  licenceOther?: string;
  repoUrl: string;
  hazards: Hazard[];
}

export interface DemoProject {
  slug: string;
  owner: string;
  editors: string[];
  status: 'published' | 'draft';
  /** Oldest first; each entry is the full metadata at that revision. */
  meta: Array<DemoProjectMeta & { author: string; daysAgo: number; message: string }>;
  boards: Array<{ label: string; releasedOn: string | null; notes: string }>;
  sections: DemoDocument[];
  logEntries: DemoLogEntry[];
}

// --- errata, lessons, proposals, comments (issue: errata and contributions) ---------------


/** An erratum's fields with board revisions named by label (the seed turns them into ids). */
export interface DemoErratumFields {
  title: string;
  /** A category slug (shared/domain.ts startingCategories). */
  category: string;
  severity: Severity;
  status: ErratumStatus;
  /** Board revision labels, e.g. ['Rev A']. */
  affected: string[];
  fixedIn: string | null;
  refdes: string[];
  parts: string[];
  pins: string[];
  symptom: string;
  cause: string;
  workaround: string;
  fix: string;
  reportedByText?: string;
}

export interface DemoErratum {
  /** Approved tag slugs (db/migrations/0004_tag_vocabulary.sql). */
  tags: string[];
  /** Login of the member credited as reporter, if a member reported it. */
  reportedBy?: string;
  /** Oldest first; each the full fields at that revision. Numbers E1, E2… follow array order. */
  revisions: Array<{ author: string; daysAgo: number; message: string; fields: DemoErratumFields }>;
  /** Discussion on the erratum. */
  comments?: DemoComment[];
}

export interface DemoComment {
  author: string;
  daysAgo: number;
  /** Markdown. */
  body: string;
}

export interface DemoLesson {
  author: string;
  daysAgo: number;
  /** Markdown, one or two sentences. */
  body: string;
  /** Tag slugs: approved ones, or new ones (created as pending, by `author`). */
  tags: string[];
  /** 1-based erratum numbers of the same project. */
  errata: number[];
}

export type DemoProposal = {
  author: string;
  daysAgo: number;
  message: string;
  status: 'open' | 'accepted' | 'declined' | 'withdrawn';
  /** For decided proposals: who decided, how long ago, and the reason (declined). */
  decidedBy?: string;
  decidedDaysAgo?: number;
  reason?: string;
  comments?: DemoComment[];
} & (
  | { kind: 'new_erratum'; payload: DemoErratumFields }
  | { kind: 'erratum_edit'; erratumNumber: number; payload: DemoErratumFields }
  | { kind: 'document_edit'; sectionTitle: string; payload: { title: string; body: string } }
);

export interface DemoContributions {
  /** Which write-up (DemoProject.slug) these belong to. */
  slug: string;
  errata: DemoErratum[];
  lessons: DemoLesson[];
  proposals: DemoProposal[];
  /** Logins following the project. */
  followers: string[];
}
