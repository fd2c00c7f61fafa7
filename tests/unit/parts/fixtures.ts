/**
 * Parts as the API sends them, built from the real profiles in db/parts (loaded through the same
 * loader the server uses), so the pages are tested against the shipped datasheet values.
 */
import type { PartMention, PartPage, PartSummary } from '@shared/contracts/checks';
import type { PartProfile } from '@shared/contracts/parts';
import { loadPartProfiles } from '../../../db/parts/load';

export const profiles = loadPartProfiles();

export function profile(slug: string): PartProfile {
  const found = profiles.find((p) => p.slug === slug);
  if (!found) throw new Error(`no part ${slug} in db/parts`);
  return found;
}

export function summary(p: PartProfile, mentionCount = 0): PartSummary {
  return {
    slug: p.slug,
    name: p.name,
    kind: p.kind,
    aliases: p.aliases,
    summary: p.summary ?? null,
    pinCount: p.pins.length,
    mentionCount,
  };
}

export const partList = { items: profiles.map((p) => summary(p, p.slug === 'atmega328p' ? 2 : 0)) };

/** Invented errata and lessons naming ATmega328P pins. */
export const mentions: PartMention[] = [
  {
    kind: 'erratum',
    title: 'A6 cannot read the door switch',
    url: '/projects/tide-clock/errata/E3',
    projectSlug: 'tide-clock',
    projectTitle: 'Tide clock',
    pins: ['A6'],
    severity: 'major',
    updatedAt: '2026-10-04T09:00:00.000Z',
  },
  {
    kind: 'lesson',
    title: 'Use D2 for the rain gauge interrupt',
    url: '/projects/rain-logger/log/12',
    projectSlug: 'rain-logger',
    projectTitle: 'Rain logger',
    pins: ['D2'],
    severity: null,
    updatedAt: '2026-09-12T09:00:00.000Z',
  },
];

export function partPage(slug: string, over: Partial<PartPage> = {}): PartPage {
  return {
    profile: profile(slug),
    architecture: slug === 'atmega328p' ? 'avr' : slug === 'esp32' ? 'xtensa' : slug === 'rp2040' ? 'arm' : 'generic',
    revision: 1,
    updatedAt: '2026-11-01T10:00:00.000Z',
    mentions: [],
    viewer: { canEdit: false },
    ...over,
  };
}
