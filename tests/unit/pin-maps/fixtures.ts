/**
 * An invented project for the pin map and memory budget tests: a tide logger built around an
 * ATmega328P, with two board revisions. Part pages carry the real profiles shipped in db/parts.
 */
import type { PartPage, PartSummary, PinMap } from '@shared/contracts/checks';
import type { ProjectDetail } from '@shared/contracts/projects';
import { loadPartProfiles } from '../../../db/parts/load';

export const slug = 'tide-logger';
export const revA = { id: 21, label: 'Rev A' };
export const revB = { id: 22, label: 'Rev B' };

const owner = { id: 5, handle: 'oda-brenner', displayName: 'Oda Brenner', avatarUrl: null };

export function projectDetail(canEdit = true): ProjectDetail {
  const board = (b: { id: number; label: string }, position: number) => ({
    ...b,
    releasedOn: null,
    notes: '',
    notesHtml: '',
    position,
  });
  return {
    id: 3,
    slug,
    title: 'Tide logger',
    summary: 'Logs the water level at the jetty.',
    licence: 'CERN-OHL-S-2.0',
    licenceOther: '',
    repoUrl: '',
    hazards: [],
    status: 'published',
    revision: 4,
    owner,
    members: [{ ...owner, role: 'owner' }],
    boardRevisions: [board(revA, 1), board(revB, 2)],
    sections: [],
    logEntries: [],
    createdAt: '2026-01-10T09:00:00.000Z',
    updatedAt: '2026-02-10T09:00:00.000Z',
    publishedAt: '2026-01-11T09:00:00.000Z',
    cover: null,
    viewer: { canEdit, canOwn: canEdit, canRestore: canEdit },
  };
}

const profiles = loadPartProfiles();

export function partPage(partSlug: string): PartPage {
  const profile = profiles.find((p) => p.slug === partSlug);
  if (!profile) throw new Error(`no profile ${partSlug}`);
  return {
    profile,
    architecture: partSlug === 'atmega328p' ? 'avr' : partSlug === 'esp32' ? 'xtensa' : 'arm',
    revision: 1,
    updatedAt: '2026-01-01T00:00:00.000Z',
    mentions: [],
    viewer: { canEdit: false },
  };
}

export const partSummaries: PartSummary[] = profiles.map((p) => ({
  slug: p.slug,
  name: p.name,
  kind: p.kind,
  aliases: p.aliases,
  summary: p.summary ?? null,
  pinCount: p.pins.length,
  mentionCount: 0,
}));

export function pinMap(over: Partial<PinMap> = {}): PinMap {
  return {
    id: 41,
    boardRevision: revA,
    part: { slug: 'atmega328p', name: 'ATmega328P' },
    supplyVolts: null,
    rows: [],
    revision: 3,
    updatedAt: '2026-02-12T09:00:00.000Z',
    ...over,
  };
}
