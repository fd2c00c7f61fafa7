/**
 * The shape of the demo write-ups (db/demo/write-ups/*.ts). The seed turns each revision into
 * a real revision row, oldest first, so history and diffs have something to show.
 */
import type { LicenceId } from '../../shared/contracts/projects';
import type { Hazard } from '../../shared/domain';

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
